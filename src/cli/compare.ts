/** `lacuna compare AUDIT A B`: inputs, parameters and measures that changed between two versions. */
import { compareVersions, formatComparison } from '../audit/compare.ts';
import { readRecord } from '../audit/versions.ts';
import { safeTerminal } from '../text/safe-terminal.ts';

export async function runCompare(workspace: string, [audit, a, b]: [string, string, string], json: boolean): Promise<number> {
  const from = readRecord(workspace, audit, a).result;
  const to = readRecord(workspace, audit, b).result;
  const comparison = compareVersions(from, to);
  process.stdout.write(json ? `${JSON.stringify(comparison, null, 2)}\n` : safeTerminal(formatComparison(comparison)));
  return 0;
}
