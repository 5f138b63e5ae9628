/**
 * BibTeX for the works in `citations.ts`: one entry per key, fields brace-delimited, LaTeX
 * specials escaped, a few accented letters and typographic marks written the BibTeX way
 * (ü → {\"u}, – → --) so that classic 8-bit BibTeX sorts and prints them.
 */
import { InternalError } from '../errors.ts';
import { WORKS, WORK_KEYS, type Work } from './citations.ts';
import { escapeLatex } from './tables.ts';

const ACCENTS: Record<string, string> = {
  'ü': '{\\"u}', 'ö': '{\\"o}', 'ä': '{\\"a}', 'Ü': '{\\"U}', 'Ö': '{\\"O}', 'Ä': '{\\"A}',
  'é': "{\\'e}", 'è': '{\\`e}', 'á': "{\\'a}", 'ó': "{\\'o}", 'í': "{\\'i}", 'ñ': '{\\~n}', 'ç': '{\\c{c}}',
  '–': '--', '—': '---', '“': '``', '”': "''", '‘': '`', '’': "'",
};

/** Field text for BibTeX: LaTeX specials escaped, then accents and marks mapped. */
export function bibtexText(s: string): string {
  return escapeLatex(s).replace(/[üöäÜÖÄéèáóíñç–—“”‘’]/g, (ch) => ACCENTS[ch]!);
}

function entry(w: Work): string {
  const fields: [string, string][] = [
    ['author', w.authors.map(bibtexText).join(' and ')],
    // Double braces keep the title's capitalisation as written.
    ['title', `{${bibtexText(w.title)}}`],
  ];
  if (w.journal) fields.push(['journal', bibtexText(w.journal)]);
  if (w.howpublished) fields.push(['howpublished', bibtexText(w.howpublished)]);
  if (w.publisher) fields.push(['publisher', bibtexText(w.publisher)]);
  if (w.address) fields.push(['address', bibtexText(w.address)]);
  fields.push(['year', String(w.year)]);
  if (w.volume) fields.push(['volume', bibtexText(w.volume)]);
  if (w.number) fields.push(['number', bibtexText(w.number)]);
  if (w.pages) fields.push(['pages', bibtexText(w.pages)]);
  // DOIs may hold `_`; BibTeX styles print the doi field verbatim, so it is not escaped.
  if (w.doi) fields.push(['doi', w.doi]);
  return `@${w.type}{${w.key},\n${fields.map(([k, v]) => `  ${k} = {${v}}`).join(',\n')}\n}\n`;
}

/** BibTeX entries for `keys` (default: every work), in the given order, duplicates dropped. Unknown keys throw. */
export function bibtex(keys?: readonly string[]): string {
  const wanted = [...new Set(keys ?? WORK_KEYS)];
  return wanted
    .map((k) => {
      const w = WORKS[k];
      if (!w) throw new InternalError(`unknown citation key ${JSON.stringify(k)}`);
      return entry(w);
    })
    .join('\n');
}
