/**
 * Charts as a page shows them: the pre-rendered SVG inlined (so the figure is there without
 * JavaScript and in print), the spec compiled to Vega at build time and embedded as inert JSON
 * for `site-client.js` to make interactive, and the description as the text alternative.
 */
import type { ChartSpec } from '../types.ts';
import { uniqueSlugger } from './site-format.ts';

/** One chart as the templates use it. All fields are text; `svg` and `specJson` are pre-checked. */
export interface ChartModel {
  /** The chart's own id (`ChartSpec.id`). */
  id: string;
  /** Anchor id of the `<figure>` (unique on the page). */
  anchor: string;
  title: string;
  description: string;
  datasetId: string | null;
  /** Inline SVG markup that passed `safeSvg`, or null (the figure then shows its description). */
  svg: string | null;
  /** Compiled Vega spec as JSON with `<`, `>`, `&`, U+2028/9 escaped; safe inside `<script>`. */
  specJson: string | null;
  /** `figures/<file>.svg`, relative to the version folder; null when there is no SVG. */
  file: string | null;
  /**
   * Whether the caption's description folds away under a summary line (it stays the figure's
   * text alternative): for charts whose numbers a table on the same page already gives.
   */
  foldCaption: boolean;
  /**
   * A chart too large to inline (`INLINE_CHART_MAX`): the page shows the SVG file as an image
   * and loads the spec from `specScript` (relative to the version folder), so no page grows
   * with the data. Both null/false for an ordinary chart.
   */
  svgAsImage: boolean;
  specScript: string | null;
}

/**
 * Most characters of inline SVG plus spec JSON one chart may add to a page. Past it, the SVG is
 * shown from its figure file and the spec loads from a script beside it; a page with a handful
 * of such charts stays well under 2 MB.
 */
export const INLINE_CHART_MAX = 300 * 1024;

/**
 * The script that hands a spec to `site-client.js` without inlining it: pages opened from
 * `file://` cannot fetch a JSON file, but they can load a script. The spec is `scriptJson`
 * output (no `<`, `>`, `&` or line separators), a valid JavaScript expression.
 */
export function specScriptText(holderId: string, specJson: string): string {
  return `(window.lacunaSpecs = window.lacunaSpecs || {})[${JSON.stringify(holderId)}] = ${specJson};\n`;
}

/**
 * Serialise a value for a `<script type="application/json">` block: `<` `>` `&` and the two
 * JavaScript line separators become `\uXXXX` escapes, so the text can never close the element
 * or open a comment. JSON.parse reads it back unchanged.
 */
export function scriptJson(value: unknown): string {
  return JSON.stringify(value).replace(/[<>&\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/**
 * Accept SVG markup for inlining only when it is one `<svg>` element with no scripts, event
 * handler attributes, foreign HTML, external references or `javascript:` addresses. Vega's SVG
 * output passes; anything else is refused (null), never repaired.
 */
export function safeSvg(svg: string | undefined): string | null {
  if (!svg) return null;
  const s = svg.trim();
  if (!/^<svg[\s>]/.test(s) || !s.endsWith('</svg>')) return null;
  const banned = [
    /<\s*script/i,
    /<\s*foreignObject/i,
    /<\s*iframe/i,
    /<\s*(image|use|feImage)\b[^>]*\b(xlink:)?href\s*=\s*["']?\s*(?!#)/i,
    /<[^>]*\son[a-z]+\s*=/i,
    /javascript\s*:/i,
    /url\(\s*["']?\s*(?!#)/i,
    /<!\[CDATA\[/i,
    /<\s*\/svg\s*>[\s\S]*<\s*\/svg\s*>/i,
  ];
  if (banned.some((re) => re.test(s))) return null;
  return s;
}

/** Options for `chartModels`: how to compile a Vega-Lite spec to Vega (null = leave static). */
export interface ChartModelOptions {
  compile: ((spec: Record<string, unknown>) => Record<string, unknown>) | null;
  /** Ids already used on the page (section anchors), to keep figure anchors unique. */
  slugger?: (text: string) => string;
  /** Largest inline SVG + spec per chart, in characters (default `INLINE_CHART_MAX`). */
  inlineMax?: number;
}

/**
 * Prepare charts for a page. A chart whose spec fails to compile stays static (its SVG, if any,
 * is still shown) and the failure is returned in `problems` so the caller can report it.
 */
export function chartModels(charts: ChartSpec[], options: ChartModelOptions): { charts: ChartModel[]; problems: string[] } {
  const slugger = options.slugger ?? uniqueSlugger();
  const fileSlugger = uniqueSlugger();
  const problems: string[] = [];
  const out = charts.map((c): ChartModel => {
    const svg = safeSvg(c.svg);
    if (c.svg && !svg) problems.push(`chart ${c.id}: SVG refused (not a plain <svg> element)`);
    let specJson: string | null = null;
    if (options.compile) {
      try {
        specJson = scriptJson(options.compile(c.spec));
      } catch (err) {
        problems.push(`chart ${c.id}: spec did not compile (${err instanceof Error ? err.message : String(err)})`);
      }
    }
    return {
      id: c.id,
      anchor: slugger(`fig-${c.id}`),
      title: c.title,
      description: c.description,
      datasetId: c.datasetId,
      svg,
      specJson,
      file: svg ? `figures/${fileSlugger(c.id)}.svg` : null,
      foldCaption: false,
      svgAsImage: false,
      specScript: null,
    };
  });
  const max = options.inlineMax ?? INLINE_CHART_MAX;
  for (const m of out) {
    if ((m.svg?.length ?? 0) + (m.specJson?.length ?? 0) <= max) continue;
    if (m.file) m.svgAsImage = true;
    if (m.specJson) m.specScript = m.file ? m.file.replace(/\.svg$/, '.spec.js') : `figures/${m.anchor}.spec.js`;
  }
  return { charts: out, problems };
}


/** Charts that belong on the drift page rather than the report: no dataset, id starting `drift-`. */
export function isDriftChart(c: { id: string; datasetId: string | null }): boolean {
  return c.datasetId === null && /^drift[-_]/i.test(c.id);
}
