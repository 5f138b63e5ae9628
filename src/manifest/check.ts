/**
 * `lacuna check`: every manifest of a workspace validated, every dataset's files inspected.
 *
 * 1. Find `audits/*.md` (no `audits/` folder is itself the one problem reported).
 * 2. Load each manifest; its field and path problems are gathered, not thrown.
 * 3. For each dataset of a valid manifest, call `inspect` (the readers' header check, passed in
 *    so this module does not depend on the readers) and gather its problems.
 * 4. Flag two manifests that share an `audit` slug (their reports would collide).
 * Errors that are not `InputError`s are bugs and propagate.
 */
import { InputError, InputErrors } from '../errors.ts';
import type { ResolvedDataset, ResolvedManifest } from './types.ts';
import { findManifests, loadManifest } from './load.ts';
import { pushAll } from '../util/arrays.ts';

export type InspectDataset = (ds: ResolvedDataset, m: ResolvedManifest) => Promise<{ problems: InputError[] }>;

export interface CheckSummary {
  /** Manifests found (valid or not). */
  manifests: number;
  /** Datasets of the valid manifests, all inspected. */
  datasets: number;
  problems: InputError[];
}

function gather(err: unknown, into: InputError[]): void {
  if (err instanceof InputErrors) pushAll(into, err.problems);
  else if (err instanceof InputError) into.push(err);
  else throw err;
}

/** Check a whole workspace and return every problem found. Cost: one header read per file (in `inspect`). */
export async function checkWorkspace(workspaceRoot: string, inspect: InspectDataset): Promise<CheckSummary> {
  const problems: InputError[] = [];
  let files: string[];
  try {
    files = await findManifests(workspaceRoot);
  } catch (err) {
    gather(err, problems);
    return { manifests: 0, datasets: 0, problems };
  }
  const slugs = new Map<string, string>();
  let datasets = 0;
  for (const file of files) {
    let m: ResolvedManifest;
    try {
      m = await loadManifest(file, workspaceRoot);
    } catch (err) {
      gather(err, problems);
      continue;
    }
    const other = slugs.get(m.audit);
    if (other !== undefined) {
      problems.push(new InputError(`found audit ${JSON.stringify(m.audit)}, already used by ${other}; allowed: one manifest per audit name`, {
        file: m.relFile,
        where: 'audit',
        hint: 'rename one of them: each audit gets its own report folder',
      }));
    } else slugs.set(m.audit, m.relFile);
    for (const ds of m.datasets) {
      datasets++;
      try {
        pushAll(problems, (await inspect(ds, m)).problems);
      } catch (err) {
        gather(err, problems);
      }
    }
  }
  return { manifests: files.length, datasets, problems };
}
