/**
 * A small, strict argument parser: known flags only, each with a type; anything else is a
 * usage error that names the flag and lists what the command accepts.
 */
import { InputError } from '../errors.ts';
import { pushAll } from '../util/arrays.ts';

export type FlagSpec = Record<string, { type: 'string' | 'boolean'; help: string; default?: string | boolean }>;

export interface Parsed {
  flags: Record<string, string | boolean | undefined>;
  positionals: string[];
}

export function parseArgs(command: string, argv: string[], spec: FlagSpec): Parsed {
  const flags: Parsed['flags'] = {};
  for (const [name, s] of Object.entries(spec)) if (s.default !== undefined) flags[name] = s.default;
  const positionals: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === '--') {
      pushAll(positionals, argv.slice(i + 1));
      break;
    }
    if (!arg.startsWith('--')) {
      if (arg.startsWith('-') && arg !== '-') throw usage(command, `unknown option "${arg}"`, spec);
      positionals.push(arg);
      continue;
    }
    const eq = arg.indexOf('=');
    const name = arg.slice(2, eq < 0 ? undefined : eq);
    const s = spec[name];
    if (!s) throw usage(command, `unknown option "--${name}"`, spec);
    if (s.type === 'boolean') {
      if (eq >= 0) throw usage(command, `--${name} takes no value`, spec);
      flags[name] = true;
    } else {
      const value = eq >= 0 ? arg.slice(eq + 1) : argv[++i];
      if (value === undefined || value === '') throw usage(command, `--${name} needs a value`, spec);
      flags[name] = value;
    }
  }
  return { flags, positionals };
}

/** A mistake on the command line (exit code 2), as opposed to a problem in the inputs (exit code 1). */
export class UsageError extends InputError {}

export function usage(command: string, message: string, spec: FlagSpec): UsageError {
  const accepted = Object.keys(spec).map((n) => `--${n}`).join(', ');
  return new UsageError(`lacuna ${command}: ${message}`, { hint: accepted ? `accepted: ${accepted}; see lacuna help ${command}` : `see lacuna help ${command}` });
}

export function flagHelp(spec: FlagSpec): string {
  return Object.entries(spec)
    .map(([n, s]) => `  --${n}${s.type === 'string' ? ' VALUE' : ''}`.padEnd(26) + s.help + (s.default !== undefined && s.type === 'string' ? ` (default: ${s.default})` : ''))
    .join('\n');
}
