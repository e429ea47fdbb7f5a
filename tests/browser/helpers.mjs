// Shared helpers for the browser tests: the static server, headless Chromium, the
// command line (the reference the page is checked against), and reading the page.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { before, after } from 'node:test';
import { chromium } from 'playwright-core';
import { startServer } from '../static-server.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
export const ROOT = path.resolve(here, '..', '..');
export const WEB = path.join(ROOT, 'web');
export const FIXTURES = path.join(ROOT, 'tests', 'fixtures');
export const OUTPUT = path.join(ROOT, 'tests', 'output');
export const DEMO = path.join(ROOT, 'maps-demo');
const TARGET = process.env.CARGO_TARGET_DIR ? path.resolve(process.env.CARGO_TARGET_DIR) : path.join(ROOT, 'target');
export const CLI = process.env.STRATAMAP_CLI ?? path.join(TARGET, 'release', 'stratamap');

export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];

/** The page's folder served at /, the fixtures at /test-fixtures/ (same origin, nothing copied). */
export function startSite() {
  for (const f of ['index.html', 'pkg/stratamap.js', 'pkg/stratamap_bg.wasm', 'maps-demo/dataset.json']) {
    if (!fs.existsSync(path.join(WEB, f))) {
      throw new Error(`web/${f} is missing: run bash web/build.sh first (tests/run-browser.sh does)`);
    }
  }
  return startServer({ root: WEB, port: 0, mounts: { '/test-fixtures/': FIXTURES } });
}

/**
 * One static site and one browser for all the tests of a file: started before them,
 * closed after them. Read `env.site` and `env.browser` inside the tests.
 */
export function useSite() {
  const env = { site: null, browser: null };
  before(async () => {
    env.site = await startSite();
    env.browser = await launchBrowser();
  });
  after(async () => {
    await env.browser?.close();
    await env.site?.close();
  });
  return env;
}

export function launchBrowser() {
  return chromium.launch({ executablePath: process.env.CHROMIUM ?? '/usr/bin/chromium', args: CHROMIUM_ARGS });
}

// ---------------------------------------------------------------------------
// The command line: `stratamap tally DATASET --scenario QUERY` (SPEC 4).

/** RFC 4180 CSV (quoted fields, doubled quotes, CRLF or LF). Returns rows of strings. */
export function parseCsv(text) {
  const rows = [];
  let row = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i += 1) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i += 1;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(field);
      field = '';
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && text[i + 1] === '\n') i += 1;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += c;
  }
  if (field !== '' || row.length) {
    row.push(field);
    rows.push(row);
  }
  return rows;
}

/**
 * Run `stratamap tally`; returns {csv, notes, header, rows: [{district, name, seats, winner,
 * margin, turnout, votes}]}. `notes` is what it printed on stderr (caution, source, clamps).
 */
export function cliTally(dataset, scenario = '') {
  const args = ['tally', dataset];
  if (scenario) args.push('--scenario', scenario);
  const run = spawnSync(CLI, args, { encoding: 'utf8' });
  if (run.error) throw run.error;
  if (run.status !== 0) throw new Error(`stratamap ${args.join(' ')} exited ${run.status}: ${run.stderr}`);
  const { stdout: csv, stderr: notes } = run;
  const [header, ...body] = parseCsv(csv);
  const expected = ['district', 'name', 'seats', 'winner', 'margin', 'turnout'];
  if (expected.some((h, i) => header[i] !== h)) throw new Error(`unexpected tally header: ${header.join(',')}`);
  const parties = header.slice(6).map((h) => h.replace(/^votes_/, ''));
  const rows = body.map((r) => ({
    district: r[0],
    name: r[1],
    seats: Number(r[2]),
    winner: r[3],
    margin: Number(r[4]),
    turnout: Number(r[5]),
    votes: r.slice(6).map(Number),
  }));
  return { csv, notes, header, parties, rows };
}

/** Seats per party id from tally rows (ties give nobody seats, SPEC 2.2). */
export function seatsByParty(tally) {
  const seats = Object.fromEntries(tally.parties.map((p) => [p, 0]));
  for (const r of tally.rows) if (r.winner !== 'tie') seats[r.winner] += r.seats;
  return seats;
}

export function readJson(file) {
  return JSON.parse(fs.readFileSync(file, 'utf8'));
}

export function featureCount(geojsonFile) {
  return readJson(geojsonFile).features.length;
}

// ---------------------------------------------------------------------------
// The page.

/**
 * Open the page at `query` (e.g. "?data=..."), collecting page errors, console errors and
 * CSP violations. Waits until the page says it is ready (or failed) and has settled.
 */
export async function openPage(browser, site, query = '', { viewport = { width: 1280, height: 900 }, expectError = false } = {}) {
  const context = await browser.newContext({ viewport, acceptDownloads: true });
  const page = await context.newPage();
  const problems = [];
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(`console.error: ${m.text()}`);
  });
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      (window.__cspViolations ??= []).push(`${e.violatedDirective} ${e.blockedURI}`);
    });
  });
  await page.goto(new URL(query, site.url).href);
  if (expectError) {
    await page.waitForSelector('#app[data-state="error"]', { state: 'attached' });
  } else {
    await page.waitForSelector('#app[data-state="ready"]', { state: 'attached' });
    await waitSettled(page);
  }
  return { page, context, problems };
}

/** Wait until the debounced work (curve, table) has caught up with the last change. */
export async function waitSettled(page) {
  await page.waitForSelector('#app[data-state="ready"][data-settled="true"]', { state: 'attached' });
}

/**
 * Bring the results table on screen and wait until it says its rows show the current
 * scenario (`data-fresh`). It refreshes only while on screen, so anything that reads or
 * clicks it goes through here first.
 */
export async function showTable(page) {
  await page.locator('#results-table').scrollIntoViewIfNeeded();
  await page.waitForSelector('#results-table[data-fresh="true"]', { state: 'attached' });
}

/**
 * Everything the tests compare: per-district winners and fills, seats, table rows, address.
 */
export async function readPage(page) {
  if ((await page.getAttribute('#app', 'data-state')) === 'ready') await showTable(page);
  return page.evaluate(() => {
    const paths = [...document.querySelectorAll('#map path.sm-district')];
    const byIndex = (list) => {
      const out = [];
      for (const node of list) out[Number(node.dataset.i)] = node;
      return out;
    };
    const ordered = byIndex(paths);
    const seats = {};
    for (const row of document.querySelectorAll('.seat-row')) seats[row.dataset.party] = Number(row.dataset.seats);
    const rows = byIndex(document.querySelectorAll('#results-table tbody tr')).map((tr) => ({
      district: tr.dataset.district,
      winner: tr.dataset.winner,
      name: tr.querySelector('th').textContent,
      margin: tr.querySelector('td[data-key="margin"]').textContent,
      turnout: tr.querySelector('td[data-key="turnout"]').textContent,
    }));
    const legend = {};
    for (const rect of document.querySelectorAll('#legend rect[data-party]')) {
      (legend[rect.dataset.party] ??= []).push(rect.dataset.fill);
    }
    return {
      pathCount: paths.length,
      winners: ordered.map((p) => p.dataset.winner),
      fills: ordered.map((p) => p.getAttribute('fill')),
      ids: ordered.map((p) => p.dataset.id),
      seats,
      rows,
      legend,
      search: location.search,
      headline: document.getElementById('headline')?.textContent ?? '',
      statusText: document.getElementById('messages-status').textContent,
      errorText: document.getElementById('messages-error').textContent,
      pwned: window.__pwned,
      csp: window.__cspViolations ?? [],
    };
  });
}

/** The scenario part of an address-bar search (without "?" and without data=). */
export function scenarioOf(search) {
  return search
    .replace(/^\?/, '')
    .split('&')
    .filter((p) => p && !p.startsWith('data='))
    .join('&');
}

/** The page shows margins and turnout with one decimal, en locale. */
export const fmt1 = (v) => new Intl.NumberFormat('en', { minimumFractionDigits: 1, maximumFractionDigits: 1 }).format(v);

/**
 * Check the page against a CLI tally: winners on the map and in the table, seats per
 * party, table margins and turnout, and each fill within the winner's legend colours.
 */
export function assertMatchesTally(assert, state, tally) {
  assert.equal(state.pathCount, tally.rows.length, 'one path per district');
  assert.deepEqual(state.ids, tally.rows.map((r) => r.district), 'paths in GeoJSON order');
  assert.deepEqual(state.winners, tally.rows.map((r) => r.winner), 'map winners equal the CLI');
  assert.deepEqual(state.rows.map((r) => r.winner), tally.rows.map((r) => r.winner), 'table winners equal the CLI');
  assert.deepEqual(state.rows.map((r) => r.margin), tally.rows.map((r) => fmt1(r.margin)), 'table margins equal the CLI');
  assert.deepEqual(state.rows.map((r) => r.turnout), tally.rows.map((r) => fmt1(r.turnout)), 'table turnout equals the CLI');
  assert.deepEqual(state.seats, seatsByParty(tally), 'seats per party equal the CLI');
  state.fills.forEach((fill, i) => {
    const allowed = state.legend[tally.rows[i].winner] ?? [];
    assert.ok(allowed.includes(fill), `district ${tally.rows[i].district}: fill ${fill} is one of ${tally.rows[i].winner}'s colours`);
  });
}
