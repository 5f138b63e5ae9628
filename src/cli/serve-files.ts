/**
 * What the preview server answers for one request: a file inside the site folder, a redirect
 * of a folder URL to its slash form, or an error status. Serves only regular files inside the
 * site folder (no `..` escape, no symlink leaving it); a file that cannot be read is answered
 * with an error status, never by stopping the server.
 */
import type { IncomingMessage, ServerResponse } from 'node:http';
import { existsSync, realpathSync, statSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { pipeline } from 'node:stream';
import { safeTerminalLine } from '../text/safe-terminal.ts';
import { extname, join, relative, resolve, sep } from 'node:path';

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

function inside(root: string, p: string): boolean {
  return p === root || p.startsWith(root + sep);
}

/** The decoded path of a request URL, resolved inside `realRoot` lexically; null when it leaves it. */
function lexicalPath(realRoot: string, urlPath: string): { path: string; decoded: string } | null {
  let decoded: string;
  try {
    decoded = decodeURIComponent(urlPath.split('?')[0]);
  } catch {
    return null;
  }
  if (decoded.includes('\0')) return null;
  const p = resolve(realRoot, '.' + decoded);
  return inside(realRoot, p) ? { path: p, decoded } : null;
}

/** Map a URL path to a regular file inside `root`, or null when it would leave it or there is none. */
export function resolveStatic(root: string, urlPath: string): string | null {
  const realRoot = realpathSync(root);
  const lex = lexicalPath(realRoot, urlPath);
  if (!lex) return null;
  let p = lex.path;
  if (existsSync(p) && statSync(p).isDirectory()) p = join(p, 'index.html');
  if (!existsSync(p)) return null;
  const real = realpathSync(p);
  return real.startsWith(realRoot + sep) && statSync(real).isFile() ? real : null;
}

/**
 * For a URL naming a folder inside `root` without its trailing slash (`/kc-survey/latest`), the
 * slash form to redirect to, so the page's relative links resolve. The location is built from
 * the resolved path alone, every segment percent-encoded and no query kept: always a path on
 * this host (never `//host`), so it cannot become an open redirect.
 */
export function folderRedirect(root: string, urlPath: string): string | null {
  const realRoot = realpathSync(root);
  const lex = lexicalPath(realRoot, urlPath);
  if (!lex || lex.decoded.endsWith('/') || lex.path === realRoot) return null;
  try {
    if (!statSync(lex.path).isDirectory() || !inside(realRoot, realpathSync(lex.path))) return null;
  } catch {
    return null;
  }
  return `/${relative(realRoot, lex.path).split(sep).map(encodeURIComponent).join('/')}/`;
}

function plain(res: ServerResponse, status: number, text: string, headers: Record<string, string> = {}): void {
  res.writeHead(status, { 'content-type': 'text/plain; charset=utf-8', ...headers }).end(`${text}\n`);
}

/** Answer one request from the site folder `root`; `log` gets one line per file that failed. */
export async function answer(root: string, req: IncomingMessage, res: ServerResponse, log: (line: string) => void): Promise<void> {
  if (req.method !== 'GET' && req.method !== 'HEAD') return plain(res, 405, 'only GET and HEAD', { allow: 'GET, HEAD' });
  const url = req.url ?? '/';
  const location = folderRedirect(root, url);
  if (location) return plain(res, 301, `moved to ${location}`, { location });
  const file = resolveStatic(root, url);
  if (!file) return plain(res, 404, 'not found');
  let handle;
  try {
    handle = await open(file, 'r');
    const st = await handle.stat();
    if (!st.isFile()) throw Object.assign(new Error('not a regular file'), { code: 'EISDIR' });
  } catch (err) {
    await handle?.close();
    log(`could not read ${safeTerminalLine(file)}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
    return plain(res, 500, 'this file could not be read');
  }
  res.writeHead(200, { 'content-type': TYPES[extname(file)] ?? 'application/octet-stream' });
  if (req.method === 'HEAD') {
    await handle.close();
    res.end();
    return;
  }
  // pipeline closes the file when the client goes away early, and on a read error ends the response.
  pipeline(handle.createReadStream(), res, (err) => {
    if (err && (err as NodeJS.ErrnoException).code !== 'ERR_STREAM_PREMATURE_CLOSE') log(`could not read ${safeTerminalLine(file)}: ${(err as NodeJS.ErrnoException).code ?? err.message}`);
  });
}
