/**
 * Timing one child process for the benchmarks (scripts/bench.ts, scripts/bench-demo.ts): wall
 * time, and under `/usr/bin/time -v` (when present) user + system CPU time and the peak resident
 * set; without it, /proc/<pid>/status VmHWM is polled every 20 ms and CPU time is not known.
 */
import { spawn } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const REPO = resolve(dirname(fileURLToPath(import.meta.url)), '..');

export interface Run {
  wallMs: number;
  /** User + system CPU time (from /usr/bin/time; null without it). */
  cpuMs: number | null;
  peakRssKiB: number | null;
  stdout: string;
}

/** Run `cmd args` in the repository folder; rejects with its own stderr lines when it fails. */
export function timedChild(cmd: string, args: string[]): Promise<Run> {
  const useTime = existsSync('/usr/bin/time');
  const [file, argv] = useTime ? ['/usr/bin/time', ['-v', cmd, ...args]] : [cmd, args];
  return new Promise((resolvePromise, reject) => {
    const t0 = performance.now();
    const child = spawn(file, argv, { stdio: ['ignore', 'pipe', 'pipe'], cwd: REPO });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    let polled = 0;
    const poll = useTime
      ? null
      : setInterval(() => {
          try {
            const m = /VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${child.pid}/status`, 'utf8'));
            if (m) polled = Math.max(polled, Number(m[1]));
          } catch {
            /* the process has just ended */
          }
        }, 20);
    child.on('error', reject);
    child.on('close', (code) => {
      const wallMs = performance.now() - t0;
      if (poll) clearInterval(poll);
      if (code !== 0) {
        const own = stderr.split('\n').filter((l) => !l.startsWith('\t') && !l.startsWith('Command exited'));
        return reject(new Error(`${cmd} ${args.join(' ')} exited with ${code}:\n${own.join('\n')}`));
      }
      const m = /Maximum resident set size \(kbytes\): (\d+)/.exec(stderr);
      const user = /User time \(seconds\): ([\d.]+)/.exec(stderr);
      const sys = /System time \(seconds\): ([\d.]+)/.exec(stderr);
      const cpuMs = user && sys ? (Number(user[1]) + Number(sys[1])) * 1000 : null;
      resolvePromise({ wallMs, cpuMs, peakRssKiB: useTime ? (m ? Number(m[1]) : null) : polled || null, stdout });
    });
  });
}

/** The JSON on a child's last line of output (bench-child.mjs prints one). */
export const lastJson = <T>(text: string): T => JSON.parse(text.trim().split('\n').pop()!) as T;
/** The median (the lower middle value of an even count). */
export const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor((xs.length - 1) / 2)];
/** The median, or NaN when any figure is missing (null: /usr/bin/time absent). */
export const med = (xs: (number | null)[]) => (xs.some((x) => x === null) ? NaN : median(xs as number[]));
export const secs = (ms: number) => `${(ms / 1000).toFixed(2)} s`;

/** The V8 flags `lacuna` runs with: those on bin/lacuna.mjs's `#!/usr/bin/env -S node …` line. */
export function lacunaNodeFlags(): string[] {
  const shebang = readFileSync(join(REPO, 'bin', 'lacuna.mjs'), 'utf8').split('\n')[0];
  return shebang.replace(/^#!.*?\bnode\b/, '').split(/\s+/).filter(Boolean);
}
