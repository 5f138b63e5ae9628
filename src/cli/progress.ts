/**
 * Progress for long steps (reading, computing, rendering).
 *
 * On a terminal: one redrawn line per step with a bar, the rate and the time left.
 * Not a terminal (CI, a log file): a plain line when a step starts and when it ends, and at
 * most one line every 10 s in between. `quiet`: nothing at all. Labels and lines may hold user
 * text (file names): control characters are made visible (text/safe-terminal.ts).
 */
import { safeTerminal, safeTerminalLine } from '../text/safe-terminal.ts';

export interface Progress {
  /** Start a step of `total` units (bytes, datasets, pages); returns a handle to advance it. */
  step(label: string, total: number, unit?: 'bytes' | 'items'): ProgressStep;
  /** A line of information (suppressed when quiet). */
  info(line: string): void;
}

export interface ProgressStep {
  advance(by: number): void;
  done(summary?: string): void;
}

type Stream = { isTTY?: boolean; columns?: number; write(s: string): unknown };

export function createProgress(options: { quiet?: boolean; stream?: Stream; now?: () => number } = {}): Progress {
  const stream: Stream = options.stream ?? process.stderr;
  const now = options.now ?? (() => performance.now());
  const quiet = options.quiet ?? false;
  const tty = Boolean(stream.isTTY) && !process.env.CI;

  return {
    info(line) {
      if (!quiet) stream.write(`${safeTerminal(line)}\n`);
    },
    step(rawLabel, total, unit = 'items') {
      const label = safeTerminalLine(rawLabel);
      const start = now();
      let doneUnits = 0;
      let lastDraw = 0;
      if (quiet) return { advance() {}, done() {} };
      if (!tty) stream.write(`${label}: started (${fmtAmount(total, unit)})\n`);
      const draw = (final: boolean) => {
        const t = now();
        if (!final && t - lastDraw < (tty ? 100 : 10_000)) return;
        lastDraw = t;
        const secs = (t - start) / 1000;
        const rate = secs > 0 ? doneUnits / secs : 0;
        const left = rate > 0 && total > doneUnits ? (total - doneUnits) / rate : 0;
        const frac = total > 0 ? Math.min(1, doneUnits / total) : 1;
        const text = `${label} ${fmtAmount(doneUnits, unit)}/${fmtAmount(total, unit)} ${fmtRate(rate, unit)}${final ? ` in ${fmtSecs(secs)}` : `, ${fmtSecs(left)} left`}`;
        if (tty) {
          const width = Math.max(10, Math.min(30, (stream.columns ?? 80) - text.length - 4));
          const filled = Math.round(frac * width);
          stream.write(`\r\x1b[2K[${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${text}${final ? '\n' : ''}`);
        } else if (!final) {
          stream.write(`${text}\n`);
        }
      };
      return {
        advance(by) {
          doneUnits += by;
          draw(false);
        },
        done(summary) {
          doneUnits = Math.max(doneUnits, total);
          if (tty) draw(true);
          else stream.write(`${label}: done in ${fmtSecs((now() - start) / 1000)}${summary ? ` (${safeTerminalLine(summary)})` : ''}\n`);
        },
      };
    },
  };
}

export function fmtAmount(n: number, unit: 'bytes' | 'items'): string {
  if (unit === 'items') return String(Math.round(n));
  if (n >= 1 << 30) return `${(n / (1 << 30)).toFixed(2)} GiB`;
  if (n >= 1 << 20) return `${(n / (1 << 20)).toFixed(1)} MiB`;
  if (n >= 1 << 10) return `${(n / (1 << 10)).toFixed(0)} KiB`;
  return `${n} B`;
}

function fmtRate(rate: number, unit: 'bytes' | 'items'): string {
  return unit === 'bytes' ? `${fmtAmount(rate, 'bytes')}/s` : `${rate.toFixed(1)}/s`;
}

function fmtSecs(s: number): string {
  if (s < 60) return `${s.toFixed(1)} s`;
  const m = Math.floor(s / 60);
  return `${m} min ${Math.round(s - 60 * m)} s`;
}
