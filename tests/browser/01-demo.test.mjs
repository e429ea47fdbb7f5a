// The demo dataset loads, and what the page shows equals `stratamap tally` (the command
// line runs the same Rust core natively; SPEC 4 is the reference for its columns).
import { test } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  DEMO, openPage, readPage, showTable, cliTally, featureCount, readJson,
  assertMatchesTally, fmt1,
  useSite,
} from './helpers.mjs';

const demoManifest = path.join(DEMO, 'dataset.json');

const env = useSite();

test('the demo loads with one path per district and the results of `stratamap tally`', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, '');
  const state = await readPage(page);
  assert.equal(state.pathCount, featureCount(path.join(DEMO, 'districts.geojson')));
  const tally = cliTally(demoManifest, '');
  assertMatchesTally(assert, state, tally);
  // The command line's CSV keeps SPEC 4's columns; its caution and source go to stderr.
  assert.match(tally.notes, /A scenario, not a forecast/);
  assert.match(tally.notes, /source: Invented demo data/);
  // Nothing moved: the address stays as opened.
  assert.equal(state.search, '');
  assert.deepEqual(state.csp, []);
  assert.deepEqual(problems, []);

  // Title, source and caution are on screen.
  const manifest = readJson(demoManifest);
  assert.equal(await page.textContent('#dataset-title'), manifest.title);
  assert.equal(await page.textContent('#dataset-source'), manifest.source);
  assert.match(await page.textContent('header .caution'), /^A scenario, not a forecast/);
  assert.ok(await page.isVisible('header .caution'));
  if (manifest.poll) assert.match(await page.textContent('#moe-line'), /margin of error/i);
  await context.close();
});

test('a district shows its numbers on focus, hover and tap', async () => {
  const { page, context } = await openPage(env.browser, env.site, '');
  const tally = cliTally(demoManifest, '');
  const parties = readJson(demoManifest).parties;
  const nameOf = (id) => (id === 'tie' ? 'Tie' : parties.find((p) => p.id === id).name);

  // Keyboard: the first Tab reaches the skip link, which jumps to the controls.
  await page.keyboard.press('Tab');
  assert.equal(await page.evaluate(() => document.activeElement.className), 'skip-link');
  await page.keyboard.press('Enter');
  await page.keyboard.press('Tab');
  assert.ok(await page.evaluate(() => document.getElementById('controls').contains(document.activeElement)));
  // Focusing a district shows its numbers.
  const i = Math.min(3, tally.rows.length - 1);
  await page.focus(`#map path[data-i="${i}"]`);
  assert.equal(await page.getAttribute('#details', 'data-district'), tally.rows[i].district);
  assert.equal(await page.textContent('#details h3'), tally.rows[i].name);
  assert.equal(await page.textContent('#details .facts dd'), nameOf(tally.rows[i].winner));
  assert.match(await page.textContent('#details .facts'), new RegExp(`${fmt1(tally.rows[i].margin).replace('.', '\\.')} points`));

  // Hover another district.
  const j = tally.rows.length - 1;
  await page.hover(`#map path[data-i="${j}"]`, { force: true });
  assert.equal(await page.getAttribute('#details', 'data-district'), tally.rows[j].district);

  // Tap (click) pins a district.
  const k = Math.min(7, tally.rows.length - 1);
  await page.click(`#map path[data-i="${k}"]`, { force: true });
  assert.equal(await page.getAttribute('#details', 'data-district'), tally.rows[k].district);
  await page.mouse.move(0, 0);
  assert.equal(await page.getAttribute('#details', 'data-district'), tally.rows[k].district, 'a tapped district stays shown');

  // The path's accessible name carries the district name.
  const label = await page.getAttribute(`#map path[data-i="${j}"]`, 'aria-label');
  assert.ok(label.startsWith(tally.rows[j].name), label);
  assert.equal(await page.getAttribute(`#map path[data-i="${j}"]`, 'tabindex'), '0');
  await context.close();
});

test('the results table sorts by a column with the mouse and with Enter', async () => {
  const { page, context } = await openPage(env.browser, env.site, '');
  const tally = cliTally(demoManifest, '');
  const header = page.locator('#results-table thead th[data-key="margin"]');
  // The rows are filled before the table is first seen, so its header buttons stay where
  // they are when it scrolls into view (a click that starts on one button ends on it).
  const at = () => header.locator('button').evaluate((b) => {
    const t = b.closest('table').getBoundingClientRect();
    const r = b.getBoundingClientRect();
    return { x: r.x - t.x, width: r.width };
  });
  const offScreen = await at();
  await showTable(page);
  assert.deepEqual(await at(), offScreen, 'the header does not move when the table comes on screen');
  await header.locator('button').click();
  assert.equal(await header.getAttribute('aria-sort'), 'descending');
  let order = await page.$$eval('#results-table tbody tr', (trs) => trs.map((tr) => tr.dataset.district));
  const byMargin = [...tally.rows]
    .map((r, i) => ({ ...r, i }))
    .sort((a, b) => b.margin - a.margin || a.i - b.i)
    .map((r) => r.district);
  assert.deepEqual(order, byMargin);

  await header.locator('button').focus();
  await page.keyboard.press('Enter');
  assert.equal(await header.getAttribute('aria-sort'), 'ascending');
  order = await page.$$eval('#results-table tbody tr', (trs) => trs.map((tr) => tr.dataset.district));
  const ascending = [...tally.rows]
    .map((r, i) => ({ ...r, i }))
    .sort((a, b) => a.margin - b.margin || a.i - b.i)
    .map((r) => r.district);
  assert.deepEqual(order, ascending);
  // Only one column is marked sorted.
  assert.equal(await page.locator('#results-table thead th[aria-sort]').count(), 1);
  await context.close();
});
