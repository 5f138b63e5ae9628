/**
 * Write the demo scenario (fictional lab, fictional animals, seeded data) into a folder.
 * The scenario itself lives in src/demo/scenario.ts so that `lacuna init` and `lacuna demo`
 * use the same code; this script is for regenerating it by hand or with another seed.
 *
 *   npx tsx scripts/make-demo.ts DIR [--seed N]
 */
import { resolve } from 'node:path';
import { DEMO_SEED, makeDemo } from '../src/demo/scenario.ts';

const args = process.argv.slice(2);
const seedAt = args.indexOf('--seed');
const seed = seedAt >= 0 ? Number(args[seedAt + 1]) : DEMO_SEED;
const dir = args.find((a, i) => !a.startsWith('--') && i !== seedAt + 1);
if (!dir || !Number.isInteger(seed) || seed < 0) {
  process.stderr.write('usage: npx tsx scripts/make-demo.ts DIR [--seed N]   (N a whole number ≥ 0)\n');
  process.exit(2);
}
const s = makeDemo(resolve(dir), { seed, overwriteManifests: false });
process.stdout.write(`wrote ${s.files.length} data files and ${s.manifests.length} manifests into ${resolve(dir)} (seed ${seed})\n`);
