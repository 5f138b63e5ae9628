/*
 * Lacuna report pages: make the pre-rendered charts interactive.
 *
 * Each figure holds a static SVG (drawn at build time) and, beside it, its Vega spec as inert
 * JSON (`<script type="application/json">`). When vega.min.js has loaded, each chart is drawn
 * again with Vega (tooltips on hover) and replaces the static copy only after it rendered, so a
 * failure leaves the static chart in place. The loader refuses every URL: pages never fetch.
 */
(function () {
  'use strict';
  // Printing shows every collapsed block (provenance, file lists), opened only for the print.
  window.addEventListener('beforeprint', function () {
    Array.prototype.forEach.call(document.querySelectorAll('details:not([open])'), function (d) {
      d.setAttribute('open', '');
      d.setAttribute('data-print-opened', '');
    });
  });
  window.addEventListener('afterprint', function () {
    Array.prototype.forEach.call(document.querySelectorAll('details[data-print-opened]'), function (d) {
      d.removeAttribute('open');
      d.removeAttribute('data-print-opened');
    });
  });

  if (typeof vega === 'undefined' || !document.querySelectorAll) return;

  var offline = vega.loader();
  offline.sanitize = function (uri) {
    return Promise.reject(new Error('Lacuna pages load no data from addresses: ' + uri));
  };

  var holders = document.querySelectorAll('[data-vega-spec]');
  Array.prototype.forEach.call(holders, function (holder) {
    // Inline as inert JSON, or (a chart too large to inline) set by a script beside the figure.
    var id = holder.getAttribute('data-vega-spec');
    var source = document.getElementById(id);
    var spec = window.lacunaSpecs && Object.prototype.hasOwnProperty.call(window.lacunaSpecs, id) ? window.lacunaSpecs[id] : null;
    if (!spec) {
      if (!source) return;
      try {
        spec = JSON.parse(source.textContent);
      } catch (e) {
        return;
      }
    }
    var target = document.createElement('div');
    target.className = 'chart-live';
    holder.appendChild(target);
    var view;
    try {
      view = new vega.View(vega.parse(spec), { renderer: 'svg', container: target, hover: true, loader: offline, logLevel: vega.Error });
    } catch (e) {
      holder.removeChild(target);
      return;
    }
    view.runAsync().then(function () {
      Array.prototype.slice.call(holder.children).forEach(function (child) {
        if (child !== target) holder.removeChild(child);
      });
      holder.classList.add('is-live');
    }, function () {
      holder.removeChild(target);
    });
  });
})();
