/**
 * Markdown from untrusted places (the lab's notes in a manifest body, generated methods text)
 * rendered to HTML that cannot run anything or reach the network.
 *
 * - markdown-it (CommonMark) with `html: false`: raw HTML in the text is shown as text.
 * - Links only to `http:`, `https:` or relative addresses (no `javascript:`, `data:`, `file:`,
 *   `mailto:`, no protocol-relative `//host`); other links stay as plain text.
 * - Images are switched off: an image would make the page fetch an address when opened.
 * - Headings are shifted down (`#` → `<h{base}>`) so the notes keep the page's heading order.
 * - External links get `rel="noopener noreferrer"`.
 *
 * The output is HTML the templates insert with `| safe`; it never goes through a template engine
 * (so `{{ }}` or `{% %}` in the notes are shown as written).
 */
import MarkdownIt from 'markdown-it';

/** Schemes a link may use; anything else with a scheme is refused. */
const ALLOWED_SCHEMES = new Set(['http', 'https']);

/**
 * Whether a link target is allowed: an http(s) address or a relative one. Control characters and
 * whitespace are removed first, as browsers do before reading the scheme (`java\tscript:`).
 */
export function isSafeLink(url: string): boolean {
  // eslint-disable-next-line no-control-regex
  const cleaned = url.replace(/[\u0000-\u0020\u007f-\u009f]/g, '');
  if (cleaned.startsWith('//') || cleaned.startsWith('\\\\') || cleaned.startsWith('/\\')) return false;
  const scheme = /^([^:/?#]*):/.exec(cleaned);
  if (!scheme) return true;
  return ALLOWED_SCHEMES.has(scheme[1].toLowerCase());
}

function makeRenderer(headingBase: number): MarkdownIt {
  const md = new MarkdownIt({ html: false, linkify: true, typographer: false });
  md.disable(['image']);
  md.validateLink = isSafeLink;
  const shift = headingBase - 1;
  md.renderer.rules.heading_open = (tokens, idx, options, _env, self) => {
    const t = tokens[idx];
    t.tag = `h${Math.min(6, Number(t.tag.slice(1)) + shift)}`;
    return self.renderToken(tokens, idx, options);
  };
  md.renderer.rules.heading_close = (tokens, idx, options, _env, self) => {
    const t = tokens[idx];
    t.tag = `h${Math.min(6, Number(t.tag.slice(1)) + shift)}`;
    return self.renderToken(tokens, idx, options);
  };
  md.renderer.rules.link_open = (tokens, idx, options, _env, self) => {
    const href = tokens[idx].attrGet('href') ?? '';
    if (/^https?:/i.test(href)) tokens[idx].attrSet('rel', 'noopener noreferrer');
    return self.renderToken(tokens, idx, options);
  };
  return md;
}

const renderers = new Map<number, MarkdownIt>();

/**
 * Render untrusted markdown to safe HTML. `headingBase` is the HTML level a `#` heading becomes
 * (default 3: the notes sit under an `<h2>`). Empty or whitespace-only text gives ''.
 * Cost: linear in the text length (markdown-it).
 */
export function renderMarkdown(text: string, headingBase = 3): string {
  if (text.trim() === '') return '';
  let md = renderers.get(headingBase);
  if (!md) {
    md = makeRenderer(headingBase);
    renderers.set(headingBase, md);
  }
  return md.render(text);
}
