/**
 * Untrusted markdown (a manifest's notes) renders to inert HTML. The attack strings are the
 * classic forms listed in the OWASP XSS Filter Evasion Cheat Sheet (scheme case, embedded tab,
 * entity-encoded scheme, `data:` and `vbscript:`) and in CommonMark 0.31 §6.5–6.7 (links,
 * autolinks, raw HTML). Expected outputs were written by hand from the CommonMark rules.
 */
import { describe, expect, it } from 'vitest';
import { isSafeLink, renderMarkdown } from '../../src/report/markdown.ts';

describe('renderMarkdown', () => {
  it('shows raw HTML as text (html: false)', () => {
    const out = renderMarkdown('<script>alert(1)</script>\n\nhi <img src=x onerror=alert(1)>');
    expect(out).not.toContain('<script');
    expect(out).not.toContain('<img');
    expect(out).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(out).toContain('hi &lt;img src=x onerror=alert(1)&gt;');
  });

  it.each([
    '[x](javascript:alert(1))',
    '[x](JaVaScRiPt:alert(1))',
    '[x](java\tscript:alert(1))',
    '[x](&#106;avascript:alert(1))',
    '[x](vbscript:msgbox(1))',
    '[x](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)',
    '[x](file:///etc/passwd)',
    '[x](//evil.example/)',
    '<javascript:alert(1)>',
    '[x][r]\n\n[r]: javascript:alert(1)',
  ])('refuses the link in %j (stays text, no href)', (src) => {
    const out = renderMarkdown(src);
    expect(out).not.toMatch(/<a\s/);
    expect(out).not.toMatch(/href=/i);
  });

  it('keeps http(s) and relative links, marks external ones noopener', () => {
    expect(renderMarkdown('[doi](https://doi.org/10.1038/35000501)')).toBe('<p><a href="https://doi.org/10.1038/35000501" rel="noopener noreferrer">doi</a></p>\n');
    expect(renderMarkdown('[csv](summary.csv)')).toBe('<p><a href="summary.csv">csv</a></p>\n');
    expect(renderMarkdown('[top](#summary)')).toBe('<p><a href="#summary">top</a></p>\n');
  });

  it('draws no images (they would fetch an address when the page opens)', () => {
    const out = renderMarkdown('![plot](https://tracker.example/p.png)');
    expect(out).not.toContain('<img');
  });

  it('shifts headings below the section heading and keeps template syntax as text', () => {
    expect(renderMarkdown('# Rig\n\n## Amp')).toBe('<h3>Rig</h3>\n<h4>Amp</h4>\n');
    expect(renderMarkdown('###### deep', 3)).toBe('<h6>deep</h6>\n');
    expect(renderMarkdown('{{ 7*7 }} {% raw %}')).toBe('<p>{{ 7*7 }} {% raw %}</p>\n');
  });

  it('gives nothing for blank notes', () => {
    expect(renderMarkdown('  \n\t')).toBe('');
  });
});

describe('isSafeLink', () => {
  it('allows http, https and relative addresses only', () => {
    expect(isSafeLink('http://a.example')).toBe(true);
    expect(isSafeLink('HTTPS://a.example')).toBe(true);
    expect(isSafeLink('figures/a.svg')).toBe(true);
    expect(isSafeLink('../index.html#x')).toBe(true);
    expect(isSafeLink('mailto:a@b.example')).toBe(false);
    expect(isSafeLink(' javascript:alert(1)')).toBe(false);
    expect(isSafeLink('\u0001javascript:alert(1)')).toBe(false);
    expect(isSafeLink('/\\evil.example')).toBe(false);
  });
});
