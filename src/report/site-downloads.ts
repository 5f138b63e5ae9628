/**
 * The downloads of one version folder: the audit result as JSON, the summary table as CSV,
 * Markdown and LaTeX, the BibTeX references, the methods paragraph, and each chart's SVG.
 * Every path is fixed or built from a slug (`figures/<chart>.svg`), so nothing lands outside
 * the target folder.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { dirname, join } from 'node:path';
import type { AuditResult } from '../types.ts';
import type { ChartModel } from './site-charts.ts';
import { specScriptText } from './site-charts.ts';
import type { VersionTexts } from './site-texts.ts';

/**
 * Write the download files into `targetDir`. A chart whose SVG was refused (`safeSvg`) or never
 * rendered gets no figure file; its page figure shows the description instead.
 */
export async function writeDownloads(result: AuditResult, models: ChartModel[], texts: VersionTexts, targetDir: string): Promise<void> {
  const files: [string, string][] = [
    ['results.json', `${JSON.stringify(result, null, 2)}\n`],
    ['summary.csv', texts.csv],
    ['summary.md', texts.markdownTable],
    ['summary.tex', texts.latex],
    ['references.bib', texts.bib],
    ['methods.md', texts.methods.markdown.endsWith('\n') ? texts.methods.markdown : `${texts.methods.markdown}\n`],
    ['methods.txt', texts.methods.plain.endsWith('\n') ? texts.methods.plain : `${texts.methods.plain}\n`],
  ];
  for (const m of models) {
    if (m.file && m.svg) files.push([m.file, `<?xml version="1.0" encoding="utf-8"?>\n${m.svg}\n`]);
    if (m.specScript && m.specJson) files.push([m.specScript, specScriptText(`${m.anchor}-spec`, m.specJson)]);
  }
  for (const [name, text] of files) {
    const path = join(targetDir, name);
    await mkdir(dirname(path), { recursive: true });
    await writeFile(path, text, 'utf8');
  }
}
