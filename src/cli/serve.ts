/**
 * `lacuna serve`: a read-only static file server on 127.0.0.1 for previewing the built site
 * (what it answers: serve-files.ts).
 *
 * It stops on SIGINT (Ctrl-C), SIGTERM and SIGHUP, closing open connections at once. Started
 * through npm (`npx lacuna serve`, `npm run …`), it runs under `sh -c` under npm: killing npm
 * ends npm and that shell but no signal reaches this process, which is left running with a new
 * parent. So under npm it also watches its parent process and stops when that changes.
 */
import { createServer } from 'node:http';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { answer } from './serve-files.ts';
import { safeTerminalLine } from '../text/safe-terminal.ts';

export { resolveStatic, folderRedirect } from './serve-files.ts';

const STOP_SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;

function listenProblem(err: NodeJS.ErrnoException, port: number): unknown {
  if (err.code === 'EADDRINUSE') {
    return new InputError(`port ${port} on 127.0.0.1 is already in use (another server, perhaps another lacuna serve, is listening there)`, {
      hint: `choose a free port with --port, e.g. --port ${port < 65535 ? port + 1 : 8081}`,
    });
  }
  if (err.code === 'EACCES') {
    return new InputError(`not allowed to listen on port ${port}`, { hint: 'ports below 1024 need special rights: choose one from 1024 to 65535 with --port' });
  }
  return err;
}

export async function runServe(out: string, portText: string, log: (line: string) => void = (l) => process.stderr.write(`${l}\n`)): Promise<number> {
  // The parent is read first, before anyone can be told the server is up and kill npm.
  const parent = process.ppid;
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new InputError(`--port must be a whole number from 1 to 65535, got "${safeTerminalLine(portText)}"`);
  if (!existsSync(join(out, 'index.html'))) throw new InputError(`no built site in ${safeTerminalLine(out)}`, { hint: 'run `lacuna build` first, or name the site folder with --out' });
  const server = createServer((req, res) => {
    answer(out, req, res, log).catch((err: unknown) => {
      log(`could not answer ${safeTerminalLine(req.url ?? '')}: ${err instanceof Error ? err.message : String(err)}`);
      if (!res.headersSent) res.writeHead(500, { 'content-type': 'text/plain; charset=utf-8' }).end('internal error\n');
      else res.destroy();
    });
  });
  await new Promise<void>((ok, fail) => {
    server.once('error', (err) => fail(listenProblem(err as NodeJS.ErrnoException, port)));
    server.listen(port, '127.0.0.1', () => ok());
  });
  server.removeAllListeners('error');
  server.on('error', (err) => log(`server error: ${err.message}`));
  log(`serving ${safeTerminalLine(out)} at http://127.0.0.1:${port}/ (Ctrl-C to stop)`);

  // Wait for a stop signal, or (under npm) for the parent process to go away.
  let watch: NodeJS.Timeout | undefined;
  const handlers = new Map<string, () => void>();
  const why = await new Promise<string>((ok) => {
    for (const s of STOP_SIGNALS) {
      const h = () => ok(s);
      handlers.set(s, h);
      process.once(s, h);
    }
    if (process.env.npm_command !== undefined) {
      watch = setInterval(() => {
        if (process.ppid !== parent) ok('npm, which started it, has ended');
      }, 500);
    }
  });
  clearInterval(watch);
  for (const [s, h] of handlers) process.off(s, h);
  await new Promise<void>((ok) => {
    server.close(() => ok());
    server.closeAllConnections();
  });
  log(`stopped (${why})`);
  return 0;
}
