/**
 * The demo's build, timed: what `lacuna demo` costs a new user, and what a rebuild with nothing
 * to do costs. The demo (src/demo/scenario.ts: 22 small datasets in three audits, about 150
 * charts) is the render-heavy case; the big benchmark (scripts/bench.ts) is the compute-heavy one.
 *
 *   node --import tsx scripts/bench-demo.ts [--repeat 3] [--profile DIR] [--node-flags "…"]
 *   (and after its own figures, `npm run bench` prints these unless given --no-demo)
 *
 *   1. dist/ is compiled if stale (what `npm ci` installs; the command runs it when current);
 *   2. per repeat: the demo scenario is written (untimed, seeded: the same bytes every time) into
 *      a fresh temporary folder; then (a) a first build (nothing cached, no records, no site) and
 *      (b) a no-op rebuild, each in a child process: scripts/bench-child.mjs run by node with the
 *      flags of bin/lacuna.mjs's `#!` line, under `/usr/bin/time -v` for CPU time and peak RSS
 *      (without it, /proc/<pid>/status VmHWM is polled every 20 ms and CPU time is not known);
 *      the folder is removed afterwards;
 *   3. figures: medians over repeats of wall time, user + system CPU time (less affected by other
 *      load on the machine than wall time), peak RSS and the build's stage timings.
 * No pass/fail: it prints figures. `--profile DIR` adds `--cpu-prof --cpu-prof-dir DIR` to the
 * first build; `--node-flags "…"` replaces the `#!` line's flags (to compare; "" for none).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { makeDemo } from '../src/demo/scenario.ts';
import { lacunaNodeFlags, lastJson, med, secs, timedChild } from './bench-timed.ts';

const SCRIPT = fileURLToPath(import.meta.url);
const REPO = resolve(dirname(SCRIPT), '..');
const STAGES = ['manifests', 'hash', 'compute', 'assemble', 'render'] as const;

export interface DemoBenchOptions {
  repeat: number;
  /** Folder for `--cpu-prof` output of the first builds, or '' for none. */
  profile?: string;
  /** V8 flags for the build; default: those on bin/lacuna.mjs's `#!` line. */
  nodeFlags?: string[];
  /** Where the lines go (default console.log). */
  print?: (line: string) => void;
}

/** One timed child process. */
export interface DemoRun {
  wallMs: number;
  /** User + system CPU time, or null without /usr/bin/time. */
  cpuMs: number | null;
  peakRssKiB: number | null;
  timings: Record<(typeof STAGES)[number], number>;
  startupMs: number;
  computed: number;
  compiled: boolean;
}

export interface DemoBenchResult {
  first: DemoRun[];
  rebuild: DemoRun[];
  loadBefore: number[];
  loadAfter: number[];
}

async function build(flags: string[], workspace: string, out: string): Promise<DemoRun> {
  const r = await timedChild(process.execPath, [...flags, join(REPO, 'scripts', 'bench-child.mjs'), workspace, out]);
  const o = lastJson<Omit<DemoRun, 'wallMs' | 'cpuMs' | 'peakRssKiB'>>(r.stdout);
  return { wallMs: r.wallMs, cpuMs: r.cpuMs, peakRssKiB: r.peakRssKiB, timings: o.timings, startupMs: o.startupMs, computed: o.computed, compiled: o.compiled };
}

const loads = (l: number[]) => l.map((x) => x.toFixed(2)).join(' ');

function describe(runs: DemoRun[]): string {
  const stages = STAGES.map((k) => `${k} ${secs(med(runs.map((r) => r.timings[k])))}`).join(', ');
  const rss = med(runs.map((r) => r.peakRssKiB));
  return (
    `${secs(med(runs.map((r) => r.wallMs)))} wall, cpu ${secs(med(runs.map((r) => r.cpuMs)))} (user + sys), ` +
    `peak RSS ${(rss / 1024).toFixed(0)} MiB; start-up ${secs(med(runs.map((r) => r.startupMs)))}, ${stages}`
  );
}

/** Time the demo's first build and a no-op rebuild, `repeat` times each; print and return the figures. */
export async function benchDemo(options: DemoBenchOptions): Promise<DemoBenchResult> {
  const print = options.print ?? ((line: string) => console.log(line));
  const flags = options.nodeFlags ?? lacunaNodeFlags();
  const c = spawnSync(process.execPath, [join(REPO, 'scripts', 'compile.mjs'), '--if-stale'], { cwd: REPO, encoding: 'utf8' });
  if (c.status !== 0) print(`compile failed (exit ${c.status}); the build runs the sources through tsx\n${c.stderr}`);
  const loadBefore = loadavg();
  print(`\ndemo: the seeded demo workspace (src/demo/scenario.ts), a first build then a no-op rebuild, in a fresh temporary folder; ${options.repeat} run(s)`);
  const first: DemoRun[] = [];
  const rebuild: DemoRun[] = [];
  for (let r = 0; r < options.repeat; r++) {
    const dir = mkdtempSync(join(tmpdir(), 'lacuna-bench-demo-'));
    try {
      const ws = join(dir, 'workspace');
      const out = join(dir, '_site');
      makeDemo(ws);
      const profile = options.profile ? ['--cpu-prof', '--cpu-prof-dir', resolve(options.profile)] : [];
      first.push(await build([...flags, ...profile], ws, out));
      rebuild.push(await build(flags, ws, out));
      const f = first[r];
      const n = rebuild[r];
      print(
        `demo run ${r + 1}/${options.repeat}: first build ${secs(f.wallMs)} (cpu ${f.cpuMs === null ? '?' : secs(f.cpuMs)}; render ${secs(f.timings.render)}), ` +
          `rebuild ${secs(n.wallMs)} (cpu ${n.cpuMs === null ? '?' : secs(n.cpuMs)}; ${n.computed} computed)`,
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }
  const loadAfter = loadavg();
  const ran = first.every((r) => r.compiled) ? 'compiled dist/' : 'src/ through tsx (dist/ absent or stale)';
  print(`
demo first build   ${describe(first)}
demo no-op rebuild ${describe(rebuild)}
demo               ${options.repeat} run(s), medians; node ${flags.join(' ') || '(no flags)'}; ran ${ran}; ${existsSync('/usr/bin/time') ? 'CPU and RSS from /usr/bin/time -v' : 'RSS polled from /proc (no CPU time)'}
demo load average  before ${loads(loadBefore)}, after ${loads(loadAfter)}`);
  return { first, rebuild, loadBefore, loadAfter };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const i = process.argv.indexOf('--repeat');
  const repeat = i >= 0 ? Number(process.argv[i + 1]) : 1;
  if (!Number.isInteger(repeat) || repeat < 1) throw new Error(`--repeat must be a whole number from 1, got ${process.argv[i + 1]}`);
  const p = process.argv.indexOf('--profile');
  const f = process.argv.indexOf('--node-flags');
  await benchDemo({ repeat, profile: p >= 0 ? process.argv[p + 1] : '', nodeFlags: f >= 0 ? (process.argv[f + 1] ?? '').split(/\s+/).filter(Boolean) : undefined });
}
