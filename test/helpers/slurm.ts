/**
 * A real one-node Slurm cluster for the tests in test/scale/: the one .ci/run started (its
 * slurm.conf named in LACUNA_TEST_SLURM_CONF; LACUNA_TEST_SLURM_UNAVAILABLE says why it has none),
 * or one started here by scripts/slurm-local.sh (which installs Debian's slurm-wlm and munge when
 * missing and it may). Where neither works, `slurmStatus.ok` is false and `reason` says why, so
 * the tests skip with that message.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';

const REPO = resolve(import.meta.dirname, '../..');
const LOCAL = join(REPO, 'scripts', 'slurm-local.sh');

export type SlurmStatus = { ok: true; conf: string; started: string | null } | { ok: false; reason: string };

function start(): SlurmStatus {
  if (process.env.LACUNA_TEST_SLURM_UNAVAILABLE) return { ok: false, reason: process.env.LACUNA_TEST_SLURM_UNAVAILABLE };
  const given = process.env.LACUNA_TEST_SLURM_CONF;
  if (given) return { ok: true, conf: given, started: null };
  if (process.platform !== 'linux') return { ok: false, reason: `scripts/slurm-local.sh needs Linux, this is ${process.platform}` };
  const dir = mkdtempSync(join(tmpdir(), 'lacuna-slurm-'));
  // apt-get may run when the packages are missing: allow it several minutes.
  const r = spawnSync('bash', [LOCAL, 'start', dir], { encoding: 'utf8', timeout: 900_000, env: slurmEnv(null) });
  if (r.status === 0) return { ok: true, conf: join(dir, 'slurm.conf'), started: dir };
  stopSlurm(dir);
  const why = (r.error?.message ?? r.stderr).trim().split('\n').slice(-6).join(' | ');
  return { ok: false, reason: `scripts/slurm-local.sh start failed (exit ${r.status}): ${why}` };
}

/** Stop the daemons `slurm-local.sh start DIR` started (by their PIDs) and remove DIR. */
export function stopSlurm(dir: string): void {
  spawnSync('bash', [LOCAL, 'stop', dir], { encoding: 'utf8', timeout: 60_000 });
  rmSync(dir, { recursive: true, force: true });
}

/**
 * A small, explicit environment for the client commands and the jobs (sbatch --export=ALL hands
 * it on): this Node first on PATH, and none of the test runner's variables.
 */
export function slurmEnv(conf: string | null): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {
    PATH: `${dirname(process.execPath)}:${process.env.PATH ?? '/usr/bin:/bin'}:/usr/sbin:/sbin`,
    HOME: process.env.HOME ?? tmpdir(),
    LANG: 'C.UTF-8',
    NO_COLOR: '1',
  };
  if (conf) env.SLURM_CONF = conf;
  return env;
}

export const slurmStatus: SlurmStatus = start();
if (!slurmStatus.ok) console.warn(`[lacuna tests] skipping the Slurm tests: ${slurmStatus.reason}`);

/** One job or array task as `scontrol show job -o` reports it. */
export interface JobState {
  id: string;
  state: string;
  reason: string;
  exitCode: string;
}

/** The state of a job, or of every task of an array job. */
export function jobStates(conf: string, id: string): JobState[] {
  const r = spawnSync('scontrol', ['show', 'job', '-o', id], { encoding: 'utf8', env: slurmEnv(conf) });
  if (r.status !== 0) throw new Error(`scontrol show job ${id}: ${r.stderr}`);
  const field = (line: string, name: string) => new RegExp(`(?:^| )${name}=(\\S*)`).exec(line)?.[1] ?? '';
  return r.stdout
    .split('\n')
    .filter((l) => l.trim())
    .map((l) => ({ id: field(l, 'JobId'), state: field(l, 'JobState'), reason: field(l, 'Reason'), exitCode: field(l, 'ExitCode') }));
}

/** Wait (polling squeue once a second) until none of the jobs is pending or running. */
export async function waitForJobs(conf: string, ids: string[], limitMs: number): Promise<void> {
  const until = Date.now() + limitMs;
  for (;;) {
    const r = spawnSync('squeue', ['-h', '-j', ids.join(','), '-o', '%i %T'], { encoding: 'utf8', env: slurmEnv(conf) });
    if (r.status === 0 && r.stdout.trim() === '') return;
    if (r.status !== 0 && /invalid job id/i.test(r.stderr)) return; // ended and already forgotten
    if (Date.now() > until) throw new Error(`jobs ${ids.join(',')} still queued after ${limitMs / 1000} s:\n${r.stdout}${r.stderr}`);
    await new Promise((done) => setTimeout(done, 1000));
  }
}
