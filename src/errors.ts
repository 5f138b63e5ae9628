/**
 * Errors for people.
 *
 * `InputError` is a problem with what the user gave us (a manifest, a data file, a
 * command-line flag): it names the file, the field or place, what was found and what is
 * allowed, and keeps the underlying cause. Anything else that escapes is a bug and is
 * printed as an internal error by the CLI.
 */

import { safeTerminal, safeTerminalLine } from './text/safe-terminal.ts';

export interface InputErrorDetails {
  /** File the problem is in (workspace-relative where possible). */
  file?: string;
  /** Manifest field (dotted path, e.g. `datasets[2].month`) or data place (`row 14, column 3`, `byte 128`). */
  where?: string;
  /** 1-based line number in the file, when known. */
  line?: number;
  /** What to do about it. */
  hint?: string;
  cause?: unknown;
}

export class InputError extends Error {
  readonly file?: string;
  readonly where?: string;
  readonly line?: number;
  readonly hint?: string;

  constructor(message: string, details: InputErrorDetails = {}) {
    super(formatInputMessage(message, details), details.cause === undefined ? undefined : { cause: details.cause });
    this.name = 'InputError';
    this.file = details.file;
    this.where = details.where;
    this.line = details.line;
    this.hint = details.hint;
  }
}

/**
 * The printed message: place, message, hint. Control characters from user text (a file name
 * with terminal escape codes) are made visible (text/safe-terminal.ts); the file and place may
 * not even break the line.
 */
function formatInputMessage(message: string, d: InputErrorDetails): string {
  const place = [d.file && safeTerminalLine(d.file), d.line !== undefined ? `line ${d.line}` : undefined, d.where && safeTerminalLine(d.where)].filter(Boolean).join(', ');
  const head = place ? `${place}: ${safeTerminal(message)}` : safeTerminal(message);
  return d.hint ? `${head} (${safeTerminal(d.hint)})` : head;
}

/**
 * An InputError whose `message` is already formatted (place and hint included), e.g. rebuilt
 * from another thread, or a wrapper whose cause already shows the hint: the hint is kept as a
 * property and not added to the message again, so it is printed once.
 */
export function inputErrorWithHint(message: string, cause: unknown, hint: string | undefined): InputError {
  const e = new InputError(message, cause === undefined ? {} : { cause });
  if (hint !== undefined) Object.defineProperty(e, 'hint', { value: hint, enumerable: true });
  return e;
}

/** Several input problems found together (validation collects every problem, not only the first). */
export class InputErrors extends Error {
  readonly problems: InputError[];
  constructor(problems: InputError[]) {
    super(problems.map((p) => p.message).join('\n'));
    this.name = 'InputErrors';
    this.problems = problems;
  }
}

/** A broken invariant inside Lacuna: a bug, never the user's fault. */
export class InternalError extends Error {
  constructor(message: string, cause?: unknown) {
    super(`internal error: ${safeTerminal(message)}`, cause === undefined ? undefined : { cause });
    this.name = 'InternalError';
  }
}

/**
 * The chain of causes of an error, outermost first, for printing as a numbered list; control
 * characters made visible (a cause from Node may quote a file name with escape codes).
 */
export function causeChain(err: unknown): string[] {
  const out: string[] = [];
  let e: unknown = err;
  for (let depth = 0; e !== undefined && e !== null && depth < 10; depth++) {
    out.push(safeTerminal(e instanceof Error ? e.message : String(e)));
    e = e instanceof Error ? (e as Error & { cause?: unknown }).cause : undefined;
  }
  return out;
}
