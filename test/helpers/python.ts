/**
 * Live cross-checks against numpy/scipy. Tests that use these skip, with a message saying
 * why, on a machine without python3 + numpy + scipy. Checks against published values never
 * go through here.
 */
import { spawnSync } from 'node:child_process';

function probe(): { ok: boolean; reason: string } {
  const r = spawnSync('python3', ['-c', 'import numpy, scipy; print(numpy.__version__, scipy.__version__)'], {
    encoding: 'utf8',
    timeout: 30_000,
  });
  if (r.error) return { ok: false, reason: `python3 not runnable (${r.error.message})` };
  if (r.status !== 0) return { ok: false, reason: `python3 has no numpy/scipy: ${r.stderr.trim().split('\n').pop()}` };
  return { ok: true, reason: `numpy/scipy ${r.stdout.trim()}` };
}

export const pythonStatus = probe();
/** True when python3 with numpy and scipy is available. Use as `describe.skipIf(!hasScipy)`. */
export const hasScipy = pythonStatus.ok;
if (!hasScipy) {
  console.warn(`[lacuna tests] skipping live scipy/numpy cross-checks: ${pythonStatus.reason}`);
}

/**
 * Run a Python snippet; `input` is passed as JSON on stdin (available as `inp` in the
 * snippet), and the snippet must `print(json.dumps(...))` its answer, which is returned parsed.
 */
export function runPython<T = unknown>(code: string, input: unknown = null): T {
  const prelude = 'import json, sys\nimport numpy as np\ninp = json.loads(sys.stdin.read())\n';
  const r = spawnSync('python3', ['-c', prelude + code], {
    input: JSON.stringify(input),
    encoding: 'utf8',
    timeout: 120_000,
    maxBuffer: 256 * 1024 * 1024,
  });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`python3 failed (${r.status}): ${r.stderr}`);
  return JSON.parse(r.stdout) as T;
}

/** Run a Python snippet for its side effects (e.g. writing fixture files into a temp folder). */
export function runPythonScript(code: string, args: string[] = []): string {
  const r = spawnSync('python3', ['-c', code, ...args], { encoding: 'utf8', timeout: 120_000 });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`python3 failed (${r.status}): ${r.stderr}`);
  return r.stdout;
}
