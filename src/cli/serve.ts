/**
 * `lacuna serve`: a read-only static file server on 127.0.0.1 for previewing the built site.
 * Serves only files inside the site folder (no `..` escape, no symlink leaving it).
 */
import { createServer } from 'node:http';
import { createReadStream, existsSync, realpathSync, statSync } from 'node:fs';
import { extname, join, resolve, sep } from 'node:path';
import { InputError } from '../errors.ts';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.csv': 'text/csv; charset=utf-8',
  '.md': 'text/markdown; charset=utf-8',
  '.tex': 'text/plain; charset=utf-8',
  '.bib': 'text/plain; charset=utf-8',
  '.png': 'image/png',
};

/** Map a URL path to a file inside `root`, or null when it would leave it or does not exist. */
export function resolveStatic(root: string, urlPath: string): string | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath.split('?')[0]);
  } catch {
    return null;
  }
  const realRoot = realpathSync(root);
  let p = resolve(realRoot, '.' + decoded);
  if (p !== realRoot && !p.startsWith(realRoot + sep)) return null;
  if (existsSync(p) && statSync(p).isDirectory()) p = join(p, 'index.html');
  if (!existsSync(p)) return null;
  const real = realpathSync(p);
  return real.startsWith(realRoot + sep) ? real : null;
}

export async function runServe(out: string, portText: string): Promise<number> {
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 1 || port > 65535) throw new InputError(`--port must be a whole number from 1 to 65535, got "${portText}"`);
  if (!existsSync(join(out, 'index.html'))) throw new InputError(`no built site in ${out}`, { hint: 'run `lacuna build` first' });
  const server = createServer((req, res) => {
    const file = resolveStatic(out, req.url ?? '/');
    if (!file || (req.method !== 'GET' && req.method !== 'HEAD')) {
      res.writeHead(404, { 'content-type': 'text/plain' }).end('not found\n');
      return;
    }
    res.writeHead(200, { 'content-type': TYPES[extname(file)] ?? 'application/octet-stream' });
    if (req.method === 'HEAD') res.end();
    else createReadStream(file).pipe(res);
  });
  await new Promise<void>((ok) => server.listen(port, '127.0.0.1', ok));
  process.stderr.write(`serving ${out} at http://127.0.0.1:${port}/ (Ctrl-C to stop)\n`);
  await new Promise<void>((ok) => process.once('SIGINT', () => server.close(() => ok())));
  return 0;
}
