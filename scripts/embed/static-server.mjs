/**
 * A static file server on 127.0.0.1 for the embed's pages (the workbench, the wiki-page tests): GET
 * only, nothing outside its folder, no listing, and every response with a strict
 * `Content-Security-Policy: default-src 'self'` (no unsafe-eval, no unsafe-inline), so that whatever it
 * serves is shown the way a careful wiki would serve it. It keeps the list of requested paths, for tests
 * that check the embed asks for nothing beyond its own files.
 *
 * What it does not do: listen anywhere but 127.0.0.1, cache, compress, or run anything. Cost: one file read
 * per request.
 */
import { createServer } from 'node:http';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { extname, join, normalize, resolve, sep } from 'node:path';

export const STRICT_CSP = "default-src 'self'";

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.png': 'image/png',
  '.svg': 'image/svg+xml',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.txt': 'text/plain; charset=utf-8',
};

/**
 * Serves `dir`; resolves with { url, requests, close() }. `csp` replaces the policy (null: none).
 * @param {string} dir
 * @param {{ port?: number, csp?: string | null }} [options]
 */
export async function serveStatic(dir, options = {}) {
  const root = resolve(dir);
  const csp = options.csp === undefined ? STRICT_CSP : options.csp;
  /** @type {string[]} */
  const requests = [];
  const server = createServer((req, res) => {
    let path;
    try {
      path = decodeURIComponent(new URL(req.url ?? '/', 'http://127.0.0.1').pathname);
    } catch {
      res.writeHead(400).end();
      return;
    }
    requests.push(path);
    let file = normalize(join(root, path));
    if (file !== root && !file.startsWith(root + sep)) {
      res.writeHead(404).end();
      return;
    }
    if (existsSync(file) && statSync(file).isDirectory()) file = join(file, 'index.html');
    const type = TYPES[extname(file)];
    const headers = { 'cache-control': 'no-store', 'x-content-type-options': 'nosniff' };
    if (csp) headers['content-security-policy'] = csp;
    if (req.method !== 'GET' || !type || !existsSync(file)) {
      res.writeHead(404, headers).end();
      return;
    }
    res.writeHead(200, { ...headers, 'content-type': type }).end(readFileSync(file));
  });
  await new Promise((ok, fail) => {
    server.once('error', fail);
    server.listen(options.port ?? 0, '127.0.0.1', () => ok(undefined));
  });
  const address = /** @type {import('node:net').AddressInfo} */ (server.address());
  return {
    url: `http://127.0.0.1:${address.port}/`,
    requests,
    close: () => new Promise((ok) => {
      server.closeAllConnections?.();
      server.close(() => ok(undefined));
    }),
  };
}
