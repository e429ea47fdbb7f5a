// A tiny static file server for the stratamap page: loopback only, no dependencies.
//
//   node tests/static-server.mjs [ROOT] [PORT]      (PORT also from $PORT; 0 = pick a free one)
//
// As a module: `const { url, close } = await startServer({ root, port: 0, mounts });`
// where mounts maps URL prefixes to more folders, e.g. {'/test-fixtures/': 'tests/fixtures'}:
// the browser tests serve their fixture datasets that way, on the page's own origin,
// without copying them into web/.
import http from 'node:http';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const HOST = '127.0.0.1';

const MIME = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.geojson': 'application/geo+json; charset=utf-8',
  '.csv': 'text/csv; charset=utf-8',
  '.txt': 'text/plain; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.wasm': 'application/wasm',
  '.map': 'application/json; charset=utf-8',
};

/** The MIME type for a file name (application/octet-stream when unknown). */
export function mimeType(file) {
  return MIME[path.extname(file).toLowerCase()] ?? 'application/octet-stream';
}

/**
 * Map a request path onto a file under root, or null when it would leave root
 * (after percent-decoding, so `%2e%2e/` is caught too) or is malformed.
 */
export function resolveRequestPath(root, requestPath) {
  let decoded;
  try {
    decoded = decodeURIComponent(requestPath);
  } catch {
    return null;
  }
  if (decoded.includes('\0') || decoded.includes('\\')) return null;
  const rootAbs = path.resolve(root);
  const full = path.resolve(rootAbs, '.' + path.posix.normalize('/' + decoded));
  if (full !== rootAbs && !full.startsWith(rootAbs + path.sep)) return null;
  // Symlinks must not lead outside root either.
  try {
    const real = fs.realpathSync(full);
    const realRoot = fs.realpathSync(rootAbs);
    if (real !== realRoot && !real.startsWith(realRoot + path.sep)) return null;
  } catch {
    // Missing file: the caller answers 404.
  }
  return full;
}

function send(res, status, body, headers = {}) {
  res.writeHead(status, { 'Content-Type': 'text/plain; charset=utf-8', ...headers });
  res.end(body);
}

/** Pick the folder and the path inside it for a URL path: the longest matching mount, else root. */
function pickRoot(root, mounts, pathname) {
  let best = null;
  for (const prefix of Object.keys(mounts)) {
    if (pathname.startsWith(prefix) && (best === null || prefix.length > best.length)) best = prefix;
  }
  if (best === null) return { dir: root, rest: pathname };
  return { dir: mounts[best], rest: '/' + pathname.slice(best.length) };
}

function handler(root, mounts) {
  return (req, res) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      send(res, 405, 'method not allowed\n', { Allow: 'GET, HEAD' });
      return;
    }
    let pathname;
    try {
      pathname = new URL(req.url, 'http://localhost').pathname;
    } catch {
      send(res, 400, 'bad request\n');
      return;
    }
    const { dir, rest } = pickRoot(root, mounts, pathname);
    let file = resolveRequestPath(dir, rest);
    if (file === null) {
      send(res, 403, 'forbidden\n');
      return;
    }
    fs.stat(file, (err, st) => {
      if (!err && st.isDirectory()) {
        if (!pathname.endsWith('/')) {
          res.writeHead(301, { Location: pathname + '/' });
          res.end();
          return;
        }
        file = path.join(file, 'index.html');
        st = fs.existsSync(file) ? fs.statSync(file) : null;
      }
      if (err || !st || !st.isFile()) {
        send(res, 404, 'not found\n');
        return;
      }
      res.writeHead(200, {
        'Content-Type': mimeType(file),
        'Content-Length': st.size,
        'Cache-Control': 'no-cache',
        'X-Content-Type-Options': 'nosniff',
      });
      if (req.method === 'HEAD') {
        res.end();
        return;
      }
      fs.createReadStream(file).pipe(res);
    });
  };
}

/**
 * Start the server on 127.0.0.1. Resolves to {server, port, url, close()}.
 * port 0 picks a free port.
 */
export function startServer({ root, port = 0, mounts = {} } = {}) {
  if (!root) throw new Error('startServer: root is required');
  for (const prefix of Object.keys(mounts)) {
    if (!prefix.startsWith('/') || !prefix.endsWith('/')) {
      throw new Error(`startServer: mount prefix must start and end with "/": ${prefix}`);
    }
  }
  const server = http.createServer(handler(root, mounts));
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(Number(port), HOST, () => {
      const actual = server.address().port;
      resolve({
        server,
        port: actual,
        url: `http://${HOST}:${actual}/`,
        close: () => new Promise((done) => server.close(() => done())),
      });
    });
  });
}

const isMain = process.argv[1] && pathToFileURL(path.resolve(process.argv[1])).href === import.meta.url;
if (isMain) {
  const here = path.dirname(fileURLToPath(import.meta.url));
  const root = path.resolve(process.argv[2] ?? path.join(here, '..', 'web'));
  const port = process.argv[3] ?? process.env.PORT ?? 0;
  if (!/^\d+$/.test(String(port)) || Number(port) > 65535) {
    console.error(`static-server: bad port ${port}`);
    process.exit(2);
  }
  startServer({ root, port })
    .then(({ url }) => {
      console.log(`Serving ${root} at ${url}`);
    })
    .catch((e) => {
      console.error(`static-server: ${e.message}`);
      process.exit(1);
    });
}
