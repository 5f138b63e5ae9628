/**
 * scripts/slurm-build.sh on a real Slurm (Debian's slurm-wlm 22.05 and munge, one node, started by
 * scripts/slurm-local.sh or by CI; see test/helpers/slurm.ts):
 * - three shards and the render job build the demo workspace into the same site as a plain
 *   `lacuna build` of a copy of it: every file of the site, results.json and the version records
 *   compared, only the creation time may differ (the plain build is the reference here; its numbers
 *   are checked against outside references elsewhere, e.g. test/audit/build.test.ts);
 * - a shard that fails gets the render job cancelled rather than left pending for ever;
 * - the script refuses, before submitting anything, a program or workspace that does not exist,
 *   and submits bash scripts that run the checkout holding it (checked with a stand-in `sbatch`
 *   that records what it is given, so this part runs without Slurm).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { tempDirs } from '../helpers/temp-dirs.ts';
import { spawnSync } from 'node:child_process';
import { chmodSync, cpSync, existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { jobStates, slurmEnv, slurmStatus, stopSlurm, waitForJobs } from '../helpers/slurm.ts';

const REPO = resolve(import.meta.dirname, '../..');
const BIN = join(REPO, 'bin', 'lacuna.mjs');
const SCRIPT = join(REPO, 'scripts', 'slurm-build.sh');
const tempDir = tempDirs();
afterAll(() => {
  if (slurmStatus.ok && slurmStatus.started) stopSlurm(slurmStatus.started);
});

const lacuna = (args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 300_000, env: slurmEnv(null) });

/** A fresh demo workspace (the seeded scenario of `lacuna init`). */
function demoWorkspace(): { base: string; ws: string } {
  const base = tempDir('lacuna-slurm-ws-');
  const ws = join(base, 'lab');
  const r = lacuna(['init', ws, '--quiet']);
  expect(r.status, r.stderr).toBe(0);
  return { base, ws };
}

function filesUnder(root: string): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      if (e.isDirectory()) walk(join(dir, e.name));
      else out.push(relative(root, join(dir, e.name)));
    }
  };
  walk(root);
  return out.sort();
}

/** A site file with the build's own time taken out: results.json parsed without `created`, pages with dates masked. */
function comparable(file: string): string | Buffer {
  if (file.endsWith('results.json')) {
    const r = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
    delete r.created;
    return JSON.stringify(r);
  }
  if (file.endsWith('.html')) return readFileSync(file, 'utf8').replace(/\d{4}-\d\d-\d\d[ T]\d\d:\d\d(:\d\d(\.\d+)?Z?)?( UTC)?/g, '<time>');
  return readFileSync(file);
}

function submit(args: string[], conf: string): { arrayId: string; renderId: string; stdout: string } {
  const r = spawnSync('bash', [SCRIPT, ...args], { encoding: 'utf8', timeout: 60_000, env: slurmEnv(conf) });
  expect(r.status, r.stderr).toBe(0);
  const arrayId = /job array (\d+)/.exec(r.stdout)?.[1];
  const renderId = /render: job (\d+)/.exec(r.stdout)?.[1];
  expect(arrayId, r.stdout).toBeDefined();
  expect(renderId, r.stdout).toBeDefined();
  return { arrayId: arrayId!, renderId: renderId!, stdout: r.stdout };
}

const logsOf = (ws: string) =>
  readdirSync(join(ws, '.lacuna-logs'))
    .sort()
    .map((f) => `--- ${f}\n${readFileSync(join(ws, '.lacuna-logs', f), 'utf8')}`)
    .join('\n');

describe.skipIf(!slurmStatus.ok)('on a one-node Slurm cluster', () => {
  const conf = slurmStatus.ok ? slurmStatus.conf : '';

  it('three shards and the render job give the site of a plain build, all but the creation time', { timeout: 900_000 }, async () => {
    const { base, ws } = demoWorkspace();
    const plainWs = join(base, 'lab-plain');
    cpSync(ws, plainWs, { recursive: true });

    const job = submit(['--workspace', ws, '--out', join(base, 'site-slurm'), '--shards', '3', '--cpus', '1', '--memory', '1G', '--time', '00:15:00'], conf);
    expect(job.stdout).toMatch(new RegExp(`squeue -j ${job.arrayId},${job.renderId}`));
    expect(job.stdout).toMatch(new RegExp(`sacct -j ${job.arrayId},${job.renderId}`));
    const plain = lacuna(['build', '--workspace', plainWs, '--out', join(base, 'site-plain'), '--quiet']);
    expect(plain.status, plain.stderr).toBe(0);
    await waitForJobs(conf, [job.arrayId, job.renderId], 840_000);

    const logs = logsOf(ws);
    const shards = jobStates(conf, job.arrayId);
    expect(shards.length, logs).toBe(3);
    for (const s of shards) expect(`${s.id} ${s.state} ${s.exitCode}`, logs).toBe(`${s.id} COMPLETED 0:0`);
    const [render] = jobStates(conf, job.renderId);
    expect(`${render.state} ${render.exitCode}`, logs).toBe('COMPLETED 0:0');
    // The shards computed every dataset; the render job only read the cache.
    const renderLog = readFileSync(join(ws, '.lacuna-logs', `lacuna-render-${job.renderId}.out`), 'utf8');
    const datasets = readdirSync(join(ws, 'audits')).reduce((n, f) => n + (readFileSync(join(ws, 'audits', f), 'utf8').match(/^  - \{ id: /gm) ?? []).length, 0);
    expect(renderLog).toContain(`all ${datasets} dataset results taken from the cache`);

    const left = join(base, 'site-plain');
    const right = join(base, 'site-slurm');
    const files = filesUnder(left);
    expect(files.filter((f) => f.endsWith('results.json')).length).toBe(3);
    expect(filesUnder(right)).toEqual(files);
    // The site's own state file names its workspace and the digests of the records it was
    // rendered from (whose creation times differ), so it is compared by its keys only.
    for (const f of files) {
      if (f === '.lacuna-site.json') continue;
      expect(comparable(join(right, f)), f).toEqual(comparable(join(left, f)));
    }
    const keys = (dir: string) => Object.keys(JSON.parse(readFileSync(join(dir, '.lacuna-site.json'), 'utf8')) as object).sort();
    expect(keys(right)).toEqual(keys(left));

    const audits = readdirSync(join(plainWs, 'records')).sort();
    expect(readdirSync(join(ws, 'records')).sort()).toEqual(audits);
    const record = (w: string, audit: string) => {
      const r = JSON.parse(readFileSync(join(w, 'records', audit, 'v001.json'), 'utf8')) as { result: Record<string, unknown>; entry: Record<string, unknown> };
      delete r.result.created;
      delete r.entry.created;
      return JSON.stringify(r).replaceAll(w, '<workspace>');
    };
    for (const audit of audits) expect(record(ws, audit), audit).toBe(record(plainWs, audit));
  });

  it('a failing shard gets the render job cancelled, not left pending', { timeout: 600_000 }, async () => {
    const { base, ws } = demoWorkspace();
    // Array task 1 (shard 2 of 3) fails at once; the render job has no task id and would go on.
    const setup = '[ "${SLURM_ARRAY_TASK_ID:-}" != 1 ] || exit 3';
    const job = submit(['--workspace', ws, '--out', join(base, 'site'), '--shards', '3', '--cpus', '1', '--setup', setup], conf);
    await waitForJobs(conf, [job.arrayId, job.renderId], 540_000);
    const logs = logsOf(ws);
    const shards = jobStates(conf, job.arrayId).map((s) => `${s.state} ${s.exitCode}`).sort();
    expect(shards, logs).toEqual(['COMPLETED 0:0', 'COMPLETED 0:0', 'FAILED 3:0']);
    const [render] = jobStates(conf, job.renderId);
    expect(render.state, JSON.stringify(render)).toBe('CANCELLED');
    expect(existsSync(join(base, 'site'))).toBe(false);
  });
});

describe('what slurm-build.sh submits (a stand-in sbatch records it)', () => {
  /** A PATH whose `sbatch` appends its arguments, LACUNA_BIN and its standard input to a log. */
  function fakeSbatch(): { env: NodeJS.ProcessEnv; log: string } {
    const dir = tempDir('lacuna-fake-sbatch-');
    const log = join(dir, 'calls.log');
    mkdirSync(join(dir, 'bin'));
    writeFileSync(
      join(dir, 'bin', 'sbatch'),
      `#!/bin/bash\n{ echo "ARGS $*"; echo "LACUNA_BIN=$LACUNA_BIN"; cat; echo "END"; } >> "${log}"\necho $((RANDOM + 100))\n`,
    );
    chmodSync(join(dir, 'bin', 'sbatch'), 0o755);
    const env = slurmEnv(null);
    env.PATH = `${join(dir, 'bin')}:${env.PATH}`;
    return { env, log };
  }

  it('two bash scripts that run the checkout holding the script; the render one dies with a failed shard', () => {
    const { ws } = demoWorkspace();
    const { env, log } = fakeSbatch();
    const r = spawnSync('bash', [SCRIPT, '--workspace', ws, '--shards', '3', '--partition', 'p1', '--account', 'a1', '--memory', '2G', '--time', '01:00:00'], { encoding: 'utf8', env });
    expect(r.status, r.stderr).toBe(0);
    const calls = readFileSync(log, 'utf8').split('END\n').filter((c) => c.trim());
    expect(calls.length).toBe(2);
    for (const c of calls) {
      const [args, bin, firstLine] = c.split('\n');
      expect(firstLine).toBe('#!/bin/bash');
      expect(bin).toBe(`LACUNA_BIN=${BIN}`);
      expect(args).toMatch(/ --partition=p1 /);
      expect(args).toMatch(/ --account=a1 /);
      expect(args).toMatch(/ --mem=2G /);
      expect(args).not.toMatch(/--wrap/);
    }
    expect(calls[0]).toMatch(/ --array=0-2 .*--time=01:00:00/);
    expect(calls[1]).toMatch(/ --dependency=afterok:\d+ --kill-on-invalid-dep=yes /);
  });

  it('refuses a program or a workspace that does not exist, and submits nothing', () => {
    const { base, ws } = demoWorkspace();
    const { env, log } = fakeSbatch();
    const noProgram = spawnSync('bash', [SCRIPT, '--workspace', ws, '--lacuna', join(base, 'nowhere', 'lacuna.mjs')], { encoding: 'utf8', env });
    expect(noProgram.status).toBe(2);
    expect(noProgram.stderr).toMatch(/nowhere\/lacuna\.mjs' does not exist/);
    const noWorkspace = spawnSync('bash', [SCRIPT, '--workspace', join(base, 'missing')], { encoding: 'utf8', env });
    expect(noWorkspace.status).toBe(2);
    expect(noWorkspace.stderr).toMatch(/no audits\/ folder/);
    expect(existsSync(log)).toBe(false);
  });
});
