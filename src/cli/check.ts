/** `lacuna check`: validate manifests and data headers without computing; exit 1 on any problem. */
import { checkWorkspace } from '../manifest/check.ts';
import { inspectDataset } from '../readers/index.ts';
import type { Progress } from './progress.ts';

export async function runCheck(workspace: string, progress: Progress): Promise<number> {
  const report = await checkWorkspace(workspace, (ds, m) => inspectDataset(ds, { kind: m.kind, binMs: m.bin_ms }));
  const head = `checked ${report.manifests} manifest${report.manifests === 1 ? '' : 's'} and ${report.datasets} dataset${report.datasets === 1 ? '' : 's'}`;
  if (report.problems.length === 0) {
    progress.info(`${head}: no problems`);
    return 0;
  }
  process.stderr.write(`${head}: ${report.problems.length} problem${report.problems.length === 1 ? '' : 's'}\n`);
  for (const p of report.problems) process.stderr.write(`  - ${p.message}\n`);
  return 1;
}
