/**
 * The `lacuna` command.
 *
 * Exit codes: 0 done; 1 the inputs have problems (check found some, or a build stopped on
 * bad input: the message names the file and place); 2 usage error; 70 internal error (a bug:
 * please report it with the printed chain of causes).
 *
 * Commands, their arguments and options are one table (commands.ts); help is made from it.
 */
import { resolve, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputErrors, InputError, causeChain } from '../errors.ts';
import { parseArgs, flagHelp, flagUsage, UsageError } from './args.ts';
import { commandSpec, COMMANDS, type CommandSpec } from './commands.ts';
import { createProgress } from './progress.ts';
import { safeTerminalLine } from '../text/safe-terminal.ts';
import { chooseOut, chooseWorkspace, describeChoice } from './workspace.ts';
import { TOOL_VERSION } from '../version.ts';

/** The installed package: only `lacuna demo` works here. */
const PACKAGE = resolve(fileURLToPath(new URL('../..', import.meta.url)));
const DEMO_WORKSPACE = join(PACKAGE, 'content');
const DEMO_OUT = join(PACKAGE, '_site');

function usageLine(name: string, c: CommandSpec): string {
  return ['lacuna', name, ...c.args, flagUsage(c.flags)].filter(Boolean).join(' ');
}

function help(command?: string): string {
  const c = commandSpec(command);
  if (command && c) {
    return `${usageLine(command, c)}\n\n${c.summary}.\n${c.details ? `\n${c.details}\n` : ''}\nOptions:\n${flagHelp(c.flags)}\n`;
  }
  return (
    `lacuna ${TOOL_VERSION}: sparsity audits with intervals, findings, drift and versioned reports\n\n` +
    `Usage: lacuna COMMAND [options]\n\nCommands:\n` +
    Object.entries(COMMANDS)
      .map(([n, c]) => `  ${n.padEnd(9)}${c.summary}`)
      .join('\n') +
    `\n  help     show help for a command (lacuna help build)\n  version  print the version (also -v, --version)\n\n` +
    `Commands that take --workspace use the current folder, or the nearest folder above it holding audits/.\n` +
    `Start with: lacuna init my-workspace && cd my-workspace && lacuna build\n`
  );
}

function version(): string {
  // How this process runs its code (bin/entry.mjs chooses): useful in a bug report.
  const how = import.meta.url.endsWith('.js') ? 'compiled JavaScript in dist/' : 'TypeScript sources through tsx';
  return `${TOOL_VERSION} (${how})\n`;
}

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (!command || command === 'help' || command === '--help' || command === '-h') {
    if (rest[0] !== undefined && !commandSpec(rest[0])) {
      process.stderr.write(`lacuna: no command "${safeTerminalLine(rest[0])}"\n\n${help()}`);
      return 2;
    }
    process.stdout.write(help(rest[0]));
    return 0;
  }
  if (command === '--version' || command === '-v' || command === 'version') {
    process.stdout.write(version());
    return 0;
  }
  const spec = commandSpec(command);
  if (!spec) {
    process.stderr.write(`lacuna: unknown command "${safeTerminalLine(command)}"\n\n${help()}`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stdout.write(help(command));
    return 0;
  }
  try {
    const { flags, positionals } = parseArgs(command, rest, spec.flags, spec.args);
    const progress = createProgress({ quiet: Boolean(flags.quiet) });
    const given = (name: string) => (flags[name] === undefined ? undefined : String(flags[name]));
    /** The workspace (and output folder) used, said in one line when found rather than given. */
    const where = (withOut: boolean) => {
      const chosen = chooseWorkspace(given('workspace'), command);
      const out = chooseOut(given('out'), chosen.workspace);
      const line = describeChoice(chosen, withOut ? { path: out, given: given('out') !== undefined } : undefined);
      if (line) progress.info(line);
      return { workspace: chosen.workspace, out };
    };
    switch (command) {
      case 'init':
        return await (await import('./init.ts')).runInit(positionals[0], progress, { addMissing: Boolean(flags['add-missing']) });
      case 'check':
        return await (await import('./check.ts')).runCheck(where(false).workspace, progress);
      case 'build': {
        const { workspace, out } = where(true);
        return await (await import('./build.ts')).runBuild({
          workspace, out, audit: given('audit'), shard: given('shard'), workers: given('workers'),
          rehash: Boolean(flags.rehash), adoptSite: Boolean(flags['adopt-site']), progress,
        });
      }
      case 'demo': {
        // The packaged demo: regenerated in place (seeded, so the same bytes), then built.
        const { makeDemo } = await import('../demo/scenario.ts');
        const step = progress.step('writing demo scenario', 1);
        step.done(`${makeDemo(DEMO_WORKSPACE, { overwriteManifests: false }).files.length} data files`);
        return await (await import('./build.ts')).runBuild({ workspace: DEMO_WORKSPACE, out: given('out') !== undefined ? resolve(String(flags.out)) : DEMO_OUT, progress, workers: 'auto' });
      }
      case 'compare': {
        const { workspace } = where(false);
        return await (await import('./compare.ts')).runCompare(workspace, positionals as [string, string, string], Boolean(flags.json));
      }
      case 'serve': {
        const out = given('out') !== undefined ? resolve(String(flags.out)) : where(true).out;
        return await (await import('./serve.ts')).runServe(out, String(flags.port));
      }
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
