// The single-file page (`bash web/bundle.sh DATASET OUT.html`), opened from file:// with
// every network request refused: the map, the sliders and the CSV match the command
// line; no request leaves the file, and its Content-Security-Policy (hashes, no
// 'unsafe-inline') is never violated.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import { FIXTURES, OUTPUT, ROOT, assertMatchesTally, cliTally, launchBrowser, readPage, scenarioOf, waitSettled } from './helpers.mjs';

const dataset = path.join(FIXTURES, 'small');
const out = path.join(OUTPUT, 'bundle', 'small.html');

test('the single file works from disk with the network blocked', async () => {
  const run = spawnSync('bash', [path.join(ROOT, 'web', 'bundle.sh'), dataset, out], {
    encoding: 'utf8',
    env: { ...process.env, STRATAMAP_SKIP_BUILD: '1' }, // run-browser.sh has just built web/pkg
  });
  assert.equal(run.status, 0, run.stderr);
  const html = fs.readFileSync(out, 'utf8');
  const csp = html.match(/<meta http-equiv="Content-Security-Policy" content="([^"]*)">/)[1];
  assert.doesNotMatch(csp, /unsafe-inline/);
  assert.match(csp, /script-src 'sha256-[A-Za-z0-9+/=]+' 'wasm-unsafe-eval'/);
  assert.match(csp, /connect-src 'none'/);
  assert.doesNotMatch(html, /<script[^>]* src=/, 'no script file');
  assert.doesNotMatch(html, /<link rel="stylesheet"/, 'no style sheet file');

  const browser = await launchBrowser();
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const requests = [];
  await context.route('**/*', (route) => {
    const url = route.request().url();
    if (url.startsWith('file:') && url.split('?')[0] === pathToFileURL(out).href) return route.continue();
    requests.push(url);
    return route.abort();
  });
  const page = await context.newPage();
  const problems = [];
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  page.on('console', (m) => m.type() === 'error' && problems.push(`console.error: ${m.text()}`));
  page.on('request', (r) => {
    if (!r.url().startsWith('data:') && !r.url().startsWith('blob:') && r.url().split('?')[0] !== pathToFileURL(out).href) requests.push(r.url());
  });
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => (window.__cspViolations ??= []).push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  await page.goto(`${pathToFileURL(out).href}?margin=all:2`);
  await page.waitForSelector('#app[data-state="ready"]', { state: 'attached' });
  await waitSettled(page);

  const first = await readPage(page);
  assert.equal(scenarioOf(first.search), 'margin=all:2');
  assertMatchesTally(assert, first, cliTally(dataset, 'margin=all:2'));

  await page.focus('#turnout-all');
  for (let k = 0; k < 6; k += 1) await page.keyboard.press('ArrowLeft');
  await waitSettled(page);
  const moved = await readPage(page);
  const scenario = scenarioOf(moved.search);
  assert.notEqual(scenario, 'margin=all:2');
  const tally = cliTally(dataset, scenario);
  assertMatchesTally(assert, moved, tally);

  const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#download-csv')]);
  assert.equal(fs.readFileSync(await dl.path(), 'utf8'), tally.csv);

  assert.deepEqual(requests, [], 'no network request');
  assert.deepEqual(moved.csp, [], 'no Content-Security-Policy violation');
  assert.deepEqual(problems, []);
  await browser.close();
});
