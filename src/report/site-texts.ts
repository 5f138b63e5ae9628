/**
 * The words and tables a version folder needs from the text modules, gathered at one seam:
 * the methods paragraph and cautions (`methods.ts`), the summary table as CSV and Markdown
 * (`tables.ts`) and as a LaTeX table of datasets × measures (`summary-tex.ts`), and BibTeX
 * entries for exactly the works the methods cite (`bibtex.ts`).
 */
import type { AuditResult } from '../types.ts';
import { bibtex } from './bibtex.ts';
import { cautionsText, methodsText } from './methods.ts';
import { summaryTex } from './summary-tex.ts';
import { summaryRows, toCsv, toMarkdown } from './tables.ts';

export interface VersionTexts {
  /** Methods paragraphs as Markdown (rendered on the page through `renderMarkdown`) and plain text. */
  methods: { markdown: string; plain: string };
  /** Plain sentences: what the intervals assume, what drift flags are, approvals for human data. */
  cautions: string[];
  csv: string;
  markdownTable: string;
  latex: string;
  bib: string;
}

/** Gather every text of one version. Pure; throws only on a bug (an unknown citation key). */
export function versionTexts(result: AuditResult): VersionTexts {
  const methods = methodsText(result);
  const rows = summaryRows(result);
  return {
    methods: { markdown: methods.markdown, plain: methods.plain },
    cautions: cautionsText(result).items,
    csv: toCsv(rows),
    markdownTable: toMarkdown(rows),
    latex: summaryTex(result),
    bib: bibtex(methods.citations),
  };
}
