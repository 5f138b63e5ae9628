/**
 * A small, strict argument parser: known flags only, each with a type, and a fixed list of
 * positional arguments; anything else is a usage error that names what was given and lists
 * what the command accepts.
 */
import { InputError } from '../errors.ts';
import { safeTerminalLine } from '../text/safe-terminal.ts';
import { pushAll } from '../util/arrays.ts';

export interface FlagDef {
  type: 'string' | 'boolean';
  help: string;
  /** Name of the value in help (`DIR`, `N`); `VALUE` when absent. */
  value?: string;
  default?: string | boolean;
}
export type FlagSpec = Record<string, FlagDef>;

export interface Parsed {
  flags: Record<string, string | boolean | undefined>;
  positionals: string[];
}

/**
 * Parse `argv` against `spec`. `positionals` names the arguments the command takes, all
 * required; fewer or more is a usage error (extra arguments are named, never ignored).
 */
export function parseArgs(command: string, argv: string[], spec: FlagSpec, positionals: readonly string[] = []): Parsed {
  const flags: Parsed['flags'] = {};
  for (const [name, s] of Object.entries(spec)) if (s.default !== undefined) flags[name] = s.default;
  const given: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '--') {
      pushAll(given, argv.slice(i + 1));
      break;
    }
    if (!arg.startsWith('--')) {
      if (arg.startsWith('-') && arg !== '-') throw usage(command, `unknown option "${safeTerminalLine(arg)}"`, spec);
      given.push(arg);
      continue;
    }
    const eq = arg.indexOf('=');
    const name = arg.slice(2, eq < 0 ? undefined : eq);
    const s = Object.hasOwn(spec, name) ? spec[name] : undefined;
    if (!s) throw usage(command, `unknown option "--${safeTerminalLine(name)}"`, spec);
    if (s.type === 'boolean') {
      if (eq >= 0) throw usage(command, `--${name} takes no value`, spec);
      flags[name] = true;
    } else {
      const value = eq >= 0 ? arg.slice(eq + 1) : argv[++i];
      if (value === undefined || value === '') throw usage(command, `--${name} needs a value`, spec);
      flags[name] = value;
    }
  }
  if (given.length > positionals.length) {
    const extra = given.slice(positionals.length).map((a) => `"${safeTerminalLine(a)}"`);
    const takes = positionals.length ? `takes ${positionals.join(' ')} only` : 'takes no arguments';
    throw usage(command, `unexpected argument${extra.length === 1 ? '' : 's'} ${extra.join(' ')} (${command} ${takes})`, spec);
  }
  if (given.length < positionals.length) throw usage(command, `needs ${positionals.join(' ')}`, spec);
  return { flags, positionals: given };
}

/** A mistake on the command line (exit code 2), as opposed to a problem in the inputs (exit code 1). */
export class UsageError extends InputError {}

export function usage(command: string, message: string, spec: FlagSpec): UsageError {
  const accepted = Object.keys(spec).map((n) => `--${n}`).join(', ');
  return new UsageError(`lacuna ${command}: ${message}`, { hint: accepted ? `accepted: ${accepted}; see lacuna help ${command}` : `see lacuna help ${command}` });
}

/** The `[--flag VALUE]` part of a usage line, every flag of the table in its order. */
export function flagUsage(spec: FlagSpec): string {
  return Object.entries(spec)
    .map(([n, s]) => `[--${n}${s.type === 'string' ? ` ${s.value ?? 'VALUE'}` : ''}]`)
    .join(' ');
}

export function flagHelp(spec: FlagSpec): string {
  return Object.entries(spec)
    .map(([n, s]) => `  --${n}${s.type === 'string' ? ` ${s.value ?? 'VALUE'}` : ''}`.padEnd(26) + s.help + (s.default !== undefined && s.type === 'string' ? ` (default: ${s.default})` : ''))
    .join('\n');
}
