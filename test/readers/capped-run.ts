/**
 * Run the `lacuna` command in a child process with a memory cap and a timeout, for inputs that
 * could make a faulty reader allocate without bound or hang. The cap is on resident memory:
 * the child's VmRSS (Linux /proc; worker threads share it) is sampled every 100 ms and the
 * child is killed past `capMb`. An address-space limit (prlimit --as) cannot be used: V8
 * reserves several GB of address space for every WebAssembly memory (h5wasm) up front.
 */
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const BIN = resolve(dirname(fileURLToPath(import.meta.url)), '../../bin/lacuna.mjs');

export interface CappedResult {
  code: number | null;
  stdout: string;
  stderr: string;
  /** Why the child was killed, or null. */
  killed: string | null;
  peakMb: number;
}

/** Children still running, killed if this process exits first (so none is left blocked). */
const live = new Set<ReturnType<typeof spawn>>();
process.on('exit', () => {
  for (const c of live) c.kill('SIGKILL');
});

function rssMb(pid: number): number {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return m ? Number(m[1]) / 1024 : 0;
  } catch {
    return 0;
  }
}

/** `lacuna ...args` with NO_COLOR, killed past `capMb` of resident memory or `timeoutMs`. */
export function runLacunaCapped(args: string[], opts: { capMb?: number; timeoutMs?: number } = {}): Promise<CappedResult> {
  const capMb = opts.capMb ?? 1500;
  const timeoutMs = opts.timeoutMs ?? 60_000;
  return new Promise((done) => {
    const child = spawn(process.execPath, [BIN, ...args], { env: { ...process.env, NO_COLOR: '1' } });
    live.add(child);
    let stdout = '';
    let stderr = '';
    let killed: string | null = null;
    let peakMb = 0;
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    const started = Date.now();
    const timer = setInterval(() => {
      const mb = rssMb(child.pid!);
      peakMb = Math.max(peakMb, mb);
      if (mb > capMb) killed = `resident memory ${mb.toFixed(0)} MB passed the ${capMb} MB cap`;
      else if (Date.now() - started > timeoutMs) killed = `still running after ${timeoutMs} ms`;
      if (killed) child.kill('SIGKILL');
    }, 100);
    child.on('close', (code) => {
      live.delete(child);
      clearInterval(timer);
      done({ code, stdout, stderr, killed, peakMb });
    });
  });
}
