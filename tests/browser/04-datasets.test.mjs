// Other datasets through ?data=: a second dataset opens, a broken one is explained, names
// that look like markup stay text, and addresses on other sites or schemes are refused.
//
// The fixtures in tests/fixtures/ are served by the test's own server at /test-fixtures/
// on the page's origin (see startSite in helpers.mjs); nothing is copied into web/.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import {
  FIXTURES, openPage, readPage, showTable, waitSettled, cliTally, featureCount,
  readJson, assertMatchesTally, scenarioOf,
  useSite,
} from './helpers.mjs';


const env = useSite();

test('?data= opens a second dataset with its own map', async () => {
  const dir = path.join(FIXTURES, 'small');
  const dataParam = 'test-fixtures/small/dataset.json';
  const { page, context, problems } = await openPage(env.browser, env.site, `?data=${dataParam}`);
  const state = await readPage(page);
  assert.equal(state.pathCount, featureCount(path.join(dir, 'districts.geojson')));
  assertMatchesTally(assert, state, cliTally(dir, ''));
  const manifest = readJson(path.join(dir, 'dataset.json'));
  assert.equal(await page.textContent('#dataset-title'), manifest.title);
  // No poll in this dataset: the poll start is disabled and baseline is chosen.
  assert.ok(await page.isDisabled('#start-poll'));
  assert.ok(await page.isChecked('#start-baseline'));
  // Its groups have sliders; the address keeps the data parameter as sliders move.
  assert.equal(await page.locator('.group[data-group]').count(), manifest.groups.length + 1);
  await page.focus('#margin-all');
  for (let k = 0; k < 4; k += 1) await page.keyboard.press('ArrowLeft');
  await waitSettled(page);
  const moved = await readPage(page);
  assert.ok(new URLSearchParams(moved.search).get('data') === dataParam, moved.search);
  assertMatchesTally(assert, moved, cliTally(dir, scenarioOf(moved.search)));
  assert.deepEqual(problems, []);
  await context.close();
});

test('a broken dataset is explained, naming the file and row', async () => {
  const { page, context } = await openPage(env.browser, env.site, '?data=test-fixtures/broken/dataset.json', { expectError: true });
  const state = await readPage(page);
  assert.match(state.errorText, /electorate\.csv/);
  assert.match(state.errorText, /row 3/);
  assert.equal(state.pathCount, 0);
  assert.ok(await page.isVisible('#messages-error .message'));
  await context.close();
});

test('names that look like markup are shown as text and run nothing', async () => {
  const dir = path.join(FIXTURES, 'hostile');
  const manifest = readJson(path.join(dir, 'dataset.json'));
  const geo = readJson(path.join(dir, 'districts.geojson'));
  const { page, context } = await openPage(env.browser, env.site, '?data=test-fixtures/hostile/dataset.json');

  // Exercise the places where names appear: details on hover and focus, a preset, sorting.
  for (let i = 0; i < geo.features.length; i += 1) {
    await page.hover(`#map path[data-i="${i}"]`, { force: true });
    await page.focus(`#map path[data-i="${i}"]`);
    assert.equal(await page.textContent('#details h3'), geo.features[i].properties.name);
  }
  await page.hover('.seat-row .seat-name');
  await page.getByRole('button', { name: manifest.presets[0].name, exact: true }).click();
  await waitSettled(page);
  await showTable(page);
  await page.click('#results-table thead th[data-key="name"] button');
  assert.equal(await page.getAttribute('#results-table thead th[data-key="name"]', 'aria-sort'), 'ascending');

  const state = await readPage(page);
  assert.equal(state.pwned, undefined, 'no script from the data ran');
  assert.deepEqual(state.csp, [], 'nothing had to be blocked by the CSP either');
  assertMatchesTally(assert, state, cliTally(dir, scenarioOf(state.search)));

  // Shown literally, as text.
  assert.equal(await page.textContent('#dataset-title'), manifest.title);
  assert.equal(await page.textContent('#dataset-source'), manifest.source);
  const titles = await page.$$eval('#map path.sm-district > title', (ts) => ts.map((t) => t.textContent));
  assert.deepEqual(titles, geo.features.map((f) => f.properties.name));
  const names = await page.$$eval('#results-table tbody tr', (trs) =>
    trs.sort((a, b) => a.dataset.i - b.dataset.i).map((tr) => tr.querySelector('th').textContent));
  assert.deepEqual(names, geo.features.map((f) => f.properties.name));
  assert.equal(await page.textContent(`.seat-row[data-party="p1"] .seat-name`), manifest.parties[0].name);
  assert.equal(await page.textContent('.group[data-group="0"] h3'), manifest.groups[0].name);

  // And nothing from the data became an element.
  const injected = await page.evaluate(() => ({
    img: document.querySelectorAll('img').length,
    iframe: document.querySelectorAll('iframe').length,
    b: document.querySelectorAll('b').length,
    i: document.querySelectorAll('main i').length,
    innerSvg: document.querySelectorAll('#map svg svg').length,
    scripts: [...document.scripts].map((s) => s.getAttribute('src')),
    handlers: [...document.querySelectorAll('*')].filter((n) => [...n.attributes].some((a) => a.name.startsWith('on'))).length,
  }));
  assert.deepEqual(injected, { img: 0, iframe: 0, b: 0, i: 0, innerSvg: 0, scripts: ['boot.js'], handlers: 0 });
  await context.close();
});

test('dataset addresses on other sites or with other schemes are refused', async () => {
  for (const bad of ['https://elsewhere.invalid/x.json', 'javascript:alert(1)', 'data:application/json,{}', '//elsewhere.invalid/x.json']) {
    const context = await env.browser.newContext();
    const page = await context.newPage();
    const requests = [];
    let dialog = false;
    page.on('request', (r) => requests.push(r.url()));
    page.on('dialog', async (d) => {
      dialog = true;
      await d.dismiss();
    });
    await page.goto(`${env.site.url}?data=${encodeURIComponent(bad)}`);
    await page.waitForSelector('#app[data-state="error"]', { state: 'attached' });
    const text = await page.textContent('#messages-error');
    assert.match(text, /refused/, `${bad}: ${text}`);
    assert.ok(text.includes(bad), `the message names the address: ${text}`);
    assert.equal(dialog, false);
    assert.ok(requests.every((u) => u.startsWith(env.site.url)), `only the page's own env.site was asked: ${requests.join(' ')}`);
    assert.equal(await page.locator('#map path').count(), 0);
    await context.close();
  }
});

test('the page names no other origin as allowed by default', () => {
  const html = fs.readFileSync(path.join(FIXTURES, '..', '..', 'web', 'index.html'), 'utf8');
  assert.match(html, /<meta name="stratamap-allow-origins" content="">/);
});
