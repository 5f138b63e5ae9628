/** `lacuna build`: compute, version and render every audit of a workspace. */
import { buildWorkspace, parseShard } from '../audit/build.ts';
import { InputError } from '../errors.ts';
import { UsageError } from './args.ts';
import type { Progress } from './progress.ts';

export async function runBuild(o: {
  workspace: string;
  out: string;
  audit?: string;
  shard?: string;
  workers?: string;
  rehash?: boolean;
  adoptSite?: boolean;
  progress: Progress;
}): Promise<number> {
  // Flags are checked before any work, and a bad one is a usage error (exit code 2).
  try {
    if (o.shard !== undefined) parseShard(o.shard);
    if (o.workers !== undefined && o.workers !== 'auto' && !(Number.isInteger(Number(o.workers)) && Number(o.workers) >= 1)) {
      throw new InputError(`--workers must be "auto" or a whole number ≥ 1, got "${o.workers}"`);
    }
  } catch (err) {
    if (err instanceof InputError) throw new UsageError(`lacuna build: ${err.message}`);
    throw err;
  }
  const s = await buildWorkspace(o);
  if (o.shard) return 0;
  for (const a of s.audits) {
    o.progress.info(`${a.audit}: ${a.reused ? `unchanged, still ${a.version}` : `new version ${a.version}`} (${a.datasets} dataset${a.datasets === 1 ? '' : 's'})`);
  }
  o.progress.info(`report: ${o.out}/index.html`);
  return 0;
}
