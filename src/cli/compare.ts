/** `lacuna compare AUDIT A B`: inputs, parameters and measures that changed between two versions. */
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { compareVersions, formatComparison } from '../audit/compare.ts';
import { readRecord } from '../audit/versions.ts';
import { InputError } from '../errors.ts';
import { findManifests, MAX_MANIFEST_BYTES } from '../manifest/load.ts';
import { parseManifestText } from '../manifest/parse.ts';
import { readManifestBytes } from '../manifest/read-bounded.ts';
import { TEXT_RULES } from '../manifest/schema.ts';
import { isFolder } from './workspace.ts';
import { safeTerminal, safeTerminalLine } from '../text/safe-terminal.ts';

/**
 * The audits a workspace knows: those with records, and those its manifests name (a manifest
 * that cannot be read names none; `lacuna check` reports it).
 */
async function knownAudits(workspace: string): Promise<string[]> {
  const names = new Set<string>();
  const records = join(workspace, 'records');
  if (isFolder(records)) for (const a of readdirSync(records)) if (!a.startsWith('.') && isFolder(join(records, a))) names.add(a);
  let files: string[] = [];
  try {
    files = await findManifests(workspace);
  } catch {
    // no audits/ folder: only the records count
  }
  for (const f of files) {
    try {
      const { data } = parseManifestText((await readManifestBytes(f, f, MAX_MANIFEST_BYTES)).toString('utf8'), f);
      const audit = (data as { audit?: unknown }).audit;
      // An audit name as the manifest schema allows it (so it names a folder inside records/).
      if (typeof audit === 'string' && TEXT_RULES.slug.test(audit)) names.add(audit);
    } catch {
      // an unreadable manifest names no audit here
    }
  }
  return [...names].sort();
}

export async function runCompare(workspace: string, [audit, a, b]: [string, string, string], json: boolean): Promise<number> {
  const known = await knownAudits(workspace);
  if (!known.includes(audit)) {
    throw new InputError(`no such audit "${safeTerminalLine(audit)}" in ${safeTerminalLine(workspace)}`, {
      hint: known.length ? `audits there: ${known.map(safeTerminalLine).join(', ')}` : 'it has no audits yet: add a manifest to audits/ and run `lacuna build`',
    });
  }
  const from = readRecord(workspace, audit, a).result;
  const to = readRecord(workspace, audit, b).result;
  const comparison = compareVersions(from, to);
  process.stdout.write(json ? `${JSON.stringify(comparison, null, 2)}\n` : safeTerminal(formatComparison(comparison)));
  return 0;
}
