/**
 * The words and tables a version folder needs from the text modules (methods paragraph,
 * cautions, summary tables, references), gathered in one place so the site has one seam.
 * TEMPORARY: wired to `methods.ts`, `tables.ts` and `bibtex.ts` once they land.
 */
import type { AuditResult } from '../types.ts';

export interface VersionTexts {
  methods: { markdown: string; plain: string };
  cautions: string[];
  csv: string;
  markdownTable: string;
  latex: string;
  bib: string;
}

export function versionTexts(result: AuditResult): VersionTexts {
  return {
    methods: { markdown: `Methods for ${result.title} (pending).`, plain: 'pending' },
    cautions: ['pending'],
    csv: '',
    markdownTable: '',
    latex: '',
    bib: '',
  };
}
