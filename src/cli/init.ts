/** `lacuna init DIR`: a new workspace holding the demo scenario (manifests + seeded data). */
import { resolve } from 'node:path';
import { InputError } from '../errors.ts';
import { makeDemo } from '../demo/scenario.ts';
import type { Progress } from './progress.ts';

export async function runInit(positionals: string[], progress: Progress, options: { keepManifests?: boolean } = {}): Promise<number> {
  if (positionals.length !== 1) throw new InputError('lacuna init needs one folder', { hint: 'lacuna init my-workspace' });
  const dir = resolve(positionals[0]);
  const step = progress.step('writing demo scenario', 1);
  const summary = makeDemo(dir, { overwriteManifests: false });
  step.done(`${summary.files.length} data files`);
  if (!options.keepManifests) {
    progress.info(`workspace ready: ${dir}`);
    progress.info(`  manifests: ${summary.manifests.length ? summary.manifests.join(', ') : '(existing manifests kept)'}`);
    progress.info(`next: lacuna check --workspace ${positionals[0]} && lacuna build --workspace ${positionals[0]}`);
  }
  return 0;
}
