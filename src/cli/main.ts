/**
 * The `lacuna` command.
 *
 * Exit codes: 0 done; 1 the inputs have problems (check found some, or a build stopped on
 * bad input: the message names the file and place); 2 usage error; 70 internal error (a bug:
 * please report it with the printed chain of causes).
 */
import { resolve, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError, InputErrors, causeChain } from '../errors.ts';
import { parseArgs, flagHelp, usage, UsageError, type FlagSpec } from './args.ts';
import { createProgress } from './progress.ts';
import { TOOL_VERSION } from '../version.ts';

const REPO = resolve(fileURLToPath(new URL('../..', import.meta.url)));
const DEFAULT_WORKSPACE = join(REPO, 'content');
const DEFAULT_OUT = join(REPO, '_site');

const common: FlagSpec = {
  workspace: { type: 'string', help: 'workspace folder holding audits/*.md', default: DEFAULT_WORKSPACE },
  quiet: { type: 'boolean', help: 'print nothing but errors' },
};

const COMMANDS: Record<string, { summary: string; usage: string; flags: FlagSpec; details?: string }> = {
  init: {
    summary: 'make a new workspace holding the demo scenario',
    usage: 'lacuna init DIR',
    flags: { quiet: common.quiet },
    details: 'Writes DIR/audits/*.md (three example manifests) and DIR/data/ (seeded demo data). Existing manifests are kept.',
  },
  check: {
    summary: 'validate every manifest and every data file header, without computing',
    usage: 'lacuna check [--workspace DIR]',
    flags: common,
    details: 'Lists every problem found (file, field or place, what was found, what is allowed) and exits 1 if there is one.',
  },
  build: {
    summary: 'compute every audit and write its versioned report',
    usage: 'lacuna build [--workspace DIR] [--out DIR] [--audit SLUG] [--shard I/N] [--rehash] [--adopt-site] [--quiet]',
    flags: {
      ...common,
      out: { type: 'string', help: 'output folder for the static site', default: DEFAULT_OUT },
      audit: { type: 'string', help: 'build only this audit' },
      shard: { type: 'string', help: 'compute only share I of N of the datasets into the cache; render nothing' },
      workers: { type: 'string', help: 'worker threads for computing datasets', default: 'auto' },
      rehash: { type: 'boolean', help: 'read every input file again instead of trusting the hash cache' },
      'adopt-site': { type: 'boolean', help: "take over an --out folder that holds another workspace's site" },
    },
    details:
      'Unchanged inputs reuse the latest version; changed inputs make a new immutable version under OUT/AUDIT/VERSION/.\n' +
      'Records of every version are kept in WORKSPACE/records/ (commit them); computed datasets are cached in WORKSPACE/.lacuna-cache/.',
  },
  compare: {
    summary: 'what changed between two versions of an audit',
    usage: 'lacuna compare AUDIT VERSION-A VERSION-B [--workspace DIR] [--json]',
    flags: { ...common, json: { type: 'boolean', help: 'print the comparison as JSON' } },
  },
  serve: {
    summary: 'preview the built site on this machine',
    usage: 'lacuna serve [--out DIR] [--port N]',
    flags: {
      out: { type: 'string', help: 'site folder to serve', default: DEFAULT_OUT },
      port: { type: 'string', help: 'port on 127.0.0.1', default: '8080' },
    },
  },
  demo: {
    summary: "write the demo data into this repository's content/ and build it",
    usage: 'lacuna demo [--out DIR] [--quiet]',
    flags: { out: { type: 'string', help: 'output folder', default: DEFAULT_OUT }, quiet: common.quiet },
  },
};

function help(command?: string): string {
  if (command && COMMANDS[command]) {
    const c = COMMANDS[command];
    return `${c.usage}\n\n${c.summary}.\n${c.details ? `\n${c.details}\n` : ''}\nOptions:\n${flagHelp(c.flags)}\n`;
  }
  return (
    `lacuna ${TOOL_VERSION}: sparsity audits with intervals, findings, drift and versioned reports\n\n` +
    `Usage: lacuna COMMAND [options]\n\nCommands:\n` +
    Object.entries(COMMANDS)
      .map(([n, c]) => `  ${n.padEnd(9)}${c.summary}`)
      .join('\n') +
    `\n  help     show help for a command (lacuna help build)\n\nStart with: lacuna init my-workspace && lacuna build --workspace my-workspace\n`
  );
}

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (!command || command === 'help' || command === '--help' || command === '-h') {
    process.stdout.write(help(rest[0]));
    return 0;
  }
  if (command === '--version') {
    // How this process runs its code (bin/entry.mjs chooses): useful in a bug report.
    const how = import.meta.url.endsWith('.js') ? 'compiled JavaScript in dist/' : 'TypeScript sources through tsx';
    process.stdout.write(`${TOOL_VERSION} (${how})\n`);
    return 0;
  }
  const spec = COMMANDS[command];
  if (!spec) {
    process.stderr.write(`lacuna: unknown command "${command}"\n\n${help()}`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stdout.write(help(command));
    return 0;
  }
  try {
    const { flags, positionals } = parseArgs(command, rest, spec.flags);
    const progress = createProgress({ quiet: Boolean(flags.quiet) });
    switch (command) {
      case 'init':
        return await (await import('./init.ts')).runInit(positionals, progress);
      case 'check':
        return await (await import('./check.ts')).runCheck(resolve(String(flags.workspace)), progress);
      case 'build':
        return await (await import('./build.ts')).runBuild({
          workspace: resolve(String(flags.workspace)),
          out: resolve(String(flags.out)),
          audit: flags.audit as string | undefined,
          shard: flags.shard as string | undefined,
          workers: String(flags.workers),
          rehash: Boolean(flags.rehash),
          adoptSite: Boolean(flags['adopt-site']),
          progress,
        });
      case 'demo': {
        const { runInit } = await import('./init.ts');
        await runInit([DEFAULT_WORKSPACE], progress, { keepManifests: true });
        return await (await import('./build.ts')).runBuild({ workspace: DEFAULT_WORKSPACE, out: resolve(String(flags.out)), progress, workers: 'auto' });
      }
      case 'compare':
        if (positionals.length !== 3) throw usage('compare', 'needs AUDIT VERSION-A VERSION-B', spec.flags);
        return await (await import('./compare.ts')).runCompare(resolve(String(flags.workspace)), positionals as [string, string, string], Boolean(flags.json));
      case 'serve':
        return await (await import('./serve.ts')).runServe(resolve(String(flags.out)), String(flags.port));
    }
    return 2;
  } catch (err) {
    return reportError(err);
  }
}

export function reportError(err: unknown): number {
  if (err instanceof InputErrors) {
    process.stderr.write(`${err.problems.length} problem${err.problems.length === 1 ? '' : 's'}:\n`);
    for (const p of err.problems) process.stderr.write(`  - ${p.message}\n`);
    return 1;
  }
  if (err instanceof InputError) {
    process.stderr.write(`error: ${err.message}\n`);
    const chain = causeChain(err).slice(1);
    chain.forEach((c, i) => process.stderr.write(`  ${i + 1}. caused by: ${c}\n`));
    return err instanceof UsageError ? 2 : 1;
  }
  process.stderr.write('internal error (a bug in lacuna; please report it with these lines):\n');
  causeChain(err).forEach((c, i) => process.stderr.write(`  ${i + 1}. ${c}\n`));
  if (err instanceof Error && err.stack) process.stderr.write(`${err.stack.split('\n').slice(1, 6).join('\n')}\n`);
  return 70;
}
