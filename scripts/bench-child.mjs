// One build for the benchmark (scripts/bench.ts runs this in a child process): loads Lacuna the
// way the `lacuna` command does (bin/entry.mjs: compiled dist/ when it matches src/, else the
// sources through tsx), builds WORKSPACE into OUT with workers 'auto', and prints one JSON line:
// stage timings, start-up time, how the code ran, and the peak RSS when computing ended.
//
//   node scripts/bench-child.mjs WORKSPACE OUT
import { importLacuna } from '../bin/entry.mjs';

const [workspace, out] = process.argv.slice(2);
const { module, compiled } = await importLacuna('audit/build');
const startupMs = performance.now(); // since process start: node, module loading (and tsx when not compiled)
let computeRssKiB = null;
// A silent Progress that notes the peak RSS when the compute step ends (before rendering).
const progress = {
  info() {},
  step(label) {
    return { advance() {}, done() { if (label.startsWith('computing')) computeRssKiB = process.resourceUsage().maxRSS; } };
  },
};
const s = await module.buildWorkspace({ workspace, out, workers: 'auto', progress });
process.stdout.write(`${JSON.stringify({ timings: s.timings, computed: s.computed, hashed: s.hashed, startupMs, computeRssKiB, compiled })}\n`);
process.exit(0);
