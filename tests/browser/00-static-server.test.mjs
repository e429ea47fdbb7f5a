// The tests' static server: MIME types the page needs (application/wasm for streaming
// compilation), directories served by index.html, and no way out of its folders.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import http from 'node:http';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { startServer } from '../static-server.mjs';

let dir;
let site;

/** A raw GET whose path is sent exactly as written (fetch would normalise "../"). */
function rawGet(port, rawPath) {
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, path: rawPath, method: 'GET' }, (res) => {
      let body = '';
      res.on('data', (c) => (body += c));
      res.on('end', () => resolve({ status: res.statusCode, type: res.headers['content-type'], body }));
    });
    req.on('error', reject);
    req.end();
  });
}

before(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stratamap-server-'));
  fs.mkdirSync(path.join(dir, 'site', 'sub'), { recursive: true });
  fs.mkdirSync(path.join(dir, 'extra'));
  fs.writeFileSync(path.join(dir, 'site', 'index.html'), '<p>home</p>');
  fs.writeFileSync(path.join(dir, 'site', 'sub', 'index.html'), '<p>sub</p>');
  fs.writeFileSync(path.join(dir, 'site', 'x.wasm'), Buffer.from([0, 97, 115, 109]));
  fs.writeFileSync(path.join(dir, 'site', 'a.js'), 'export {};');
  fs.writeFileSync(path.join(dir, 'site', 'd.geojson'), '{}');
  fs.writeFileSync(path.join(dir, 'extra', 'e.csv'), 'a,b\n');
  fs.writeFileSync(path.join(dir, 'secret.txt'), 'not for the web');
  fs.symlinkSync(path.join(dir, 'secret.txt'), path.join(dir, 'site', 'link.txt'));
  site = await startServer({ root: path.join(dir, 'site'), port: 0, mounts: { '/more/': path.join(dir, 'extra') } });
});
after(async () => {
  await site?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

test('binds to loopback on a free port', () => {
  assert.equal(site.server.address().address, '127.0.0.1');
  assert.ok(site.port > 0);
});

test('serves files with the types the page needs', async () => {
  const cases = [
    ['/x.wasm', 'application/wasm'],
    ['/a.js', 'text/javascript; charset=utf-8'],
    ['/d.geojson', 'application/geo+json; charset=utf-8'],
    ['/index.html', 'text/html; charset=utf-8'],
    ['/more/e.csv', 'text/csv; charset=utf-8'],
  ];
  for (const [p, type] of cases) {
    const r = await rawGet(site.port, p);
    assert.equal(r.status, 200, p);
    assert.equal(r.type, type, p);
  }
});

test('serves index.html for a folder', async () => {
  assert.equal((await rawGet(site.port, '/')).body, '<p>home</p>');
  assert.equal((await rawGet(site.port, '/sub/')).body, '<p>sub</p>');
  assert.equal((await rawGet(site.port, '/sub')).status, 301);
});

test('refuses to leave its folders', async () => {
  for (const p of ['/../secret.txt', '/%2e%2e/secret.txt', '/sub/..%2f..%2fsecret.txt', '/more/../../secret.txt', '/more/%2e%2e/%2e%2e/secret.txt', '/link.txt', '/%00', '/..\\secret.txt']) {
    const r = await rawGet(site.port, p);
    assert.ok(r.status === 403 || r.status === 404, `${p} gave ${r.status}`);
    assert.doesNotMatch(r.body, /not for the web/, p);
  }
});
