/**
 * The one table of commands, their arguments and their options. The parser, `lacuna help`
 * (usage lines and option lists) and the checks on extra arguments all read it, so the help
 * cannot drift from what a command accepts. To add an option, add a row here.
 */
import type { FlagDef, FlagSpec } from './args.ts';

const workspace: FlagDef = {
  type: 'string',
  value: 'DIR',
  help: 'workspace folder holding audits/*.md (default: the current folder, or the nearest folder above it holding audits/)',
};
const out: FlagDef = { type: 'string', value: 'DIR', help: 'output folder for the static site (default: WORKSPACE/_site)' };
const quiet: FlagDef = { type: 'boolean', help: 'print nothing but errors' };

/** Options of `lacuna build`, in help order. */
export const BUILD_FLAGS: FlagSpec = {
  workspace,
  out,
  audit: { type: 'string', value: 'SLUG', help: 'build only this audit' },
  shard: { type: 'string', value: 'I/N', help: 'compute only share I of N of the datasets into the cache; render nothing' },
  workers: { type: 'string', value: 'N', help: 'worker threads for computing datasets ("auto" or a whole number)', default: 'auto' },
  rehash: { type: 'boolean', help: 'read every input file again instead of trusting the hash cache' },
  'adopt-site': { type: 'boolean', help: "take over an --out folder that holds another workspace's site" },
  quiet,
};

export interface CommandSpec {
  summary: string;
  /** Positional arguments, all required, in order. */
  args: readonly string[];
  flags: FlagSpec;
  details?: string;
}

export const COMMANDS: Record<string, CommandSpec> = {
  init: {
    summary: 'make a new workspace holding the demo scenario',
    args: ['DIR'],
    flags: {
      'add-missing': { type: 'boolean', help: 'DIR already holds files: write only the demo files missing there' },
      quiet,
    },
    details:
      'Writes DIR/audits/*.md (three example manifests) and DIR/data/ (seeded demo data) into a new or empty folder.\n' +
      'It never replaces a file: into a folder that already holds files it writes nothing and lists what it would\n' +
      'write, unless --add-missing is given, which writes the missing files and keeps every existing one.',
  },
  check: {
    summary: 'validate every manifest and every data file header, without computing',
    args: [],
    flags: { workspace, quiet },
    details: 'Lists every problem found (file, field or place, what was found, what is allowed) and exits 1 if there is one.',
  },
  build: {
    summary: 'compute every audit and write its versioned report',
    args: [],
    flags: BUILD_FLAGS,
    details:
      'Unchanged inputs reuse the latest version; changed inputs make a new immutable version under OUT/AUDIT/VERSION/.\n' +
      'Records of every version are kept in WORKSPACE/records/ (commit them); computed datasets are cached in WORKSPACE/.lacuna-cache/.',
  },
  compare: {
    summary: 'what changed between two versions of an audit',
    args: ['AUDIT', 'VERSION-A', 'VERSION-B'],
    flags: { workspace, json: { type: 'boolean', help: 'print the comparison as JSON' }, quiet },
  },
  serve: {
    summary: 'preview the built site on this machine',
    args: [],
    flags: {
      out: { type: 'string', value: 'DIR', help: 'site folder to serve (default: WORKSPACE/_site)' },
      workspace,
      port: { type: 'string', value: 'N', help: 'port on 127.0.0.1', default: '8080' },
    },
    details: 'Stops on Ctrl-C, SIGTERM or SIGHUP; started through npm or npx, it also stops when npm does.',
  },
  demo: {
    summary: "write the demo data into the installed package's content/ and build it",
    args: [],
    flags: { out: { type: 'string', value: 'DIR', help: "output folder (default: the installed package's _site/)" }, quiet },
  },
};

/**
 * The command named `name`, or undefined. Own keys only: a word a user types (`toString`,
 * `constructor`) must not find what every object inherits.
 */
export function commandSpec(name: string | undefined): CommandSpec | undefined {
  return name !== undefined && Object.hasOwn(COMMANDS, name) ? COMMANDS[name] : undefined;
}
