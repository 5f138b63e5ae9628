/** `lacuna build`: compute, version and render every audit of a workspace. */
import { buildWorkspace } from '../audit/build.ts';
import type { Progress } from './progress.ts';

export async function runBuild(o: { workspace: string; out: string; audit?: string; shard?: string; workers?: string; progress: Progress }): Promise<number> {
  const s = await buildWorkspace(o);
  if (o.shard) return 0;
  for (const a of s.audits) {
    o.progress.info(`${a.audit}: ${a.reused ? `unchanged, still ${a.version}` : `new version ${a.version}`} (${a.datasets} dataset${a.datasets === 1 ? '' : 's'})`);
  }
  o.progress.info(`report: ${o.out}/index.html`);
  return 0;
}
