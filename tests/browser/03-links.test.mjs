// Share links: a link's scenario shows on the sliders and gives the CLI's results; a bad
// value is named in the message area while the rest applies (SPEC 3).
import { test } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  DEMO, openPage, readPage, cliTally, readJson,
  assertMatchesTally, scenarioOf,
  useSite,
} from './helpers.mjs';

const demoManifest = path.join(DEMO, 'dataset.json');
const manifest = readJson(demoManifest);
const G = manifest.groups[1].id; // a real group of the demo
const gIndex = 1;

const env = useSite();

test('a link with values shows them on the sliders and the matching results', async () => {
  const query = `turnout=all:3,${G}:-5&margin=${G}:4`;
  const { page, context, problems } = await openPage(env.browser, env.site, `?${query}`);
  assert.equal(await page.inputValue('#turnout-all'), '3');
  assert.equal(await page.textContent('#turnout-all-value'), '+3.0');
  assert.equal(await page.inputValue(`#turnout-${gIndex}`), '-5');
  assert.equal(await page.textContent(`#turnout-${gIndex}-value`), '\u22125.0');
  assert.equal(await page.inputValue(`#margin-${gIndex}`), '4');
  assert.equal(await page.textContent(`#margin-${gIndex}-value`), '+4.0');
  assert.equal(await page.inputValue('#margin-all'), '0');

  const state = await readPage(page);
  assertMatchesTally(assert, state, cliTally(demoManifest, query));
  // The address bar holds the canonical form of the same scenario.
  assert.equal(cliTally(demoManifest, scenarioOf(state.search)).csv, cliTally(demoManifest, query).csv);
  assert.equal(state.statusText, '');
  assert.deepEqual(problems, []);
  await context.close();
});

test('a value beyond the sliders\' range still applies and shows its number', async () => {
  const query = `turnout=${G}:35.25`;
  const { page, context } = await openPage(env.browser, env.site, `?${query}`);
  assert.equal(await page.textContent(`#turnout-${gIndex}-value`), '+35.25');
  assert.ok(Number(await page.getAttribute(`#turnout-${gIndex}`, 'max')) >= 35.25);
  assert.equal(Number(await page.inputValue(`#turnout-${gIndex}`)), 35.25);
  assertMatchesTally(assert, await readPage(page), cliTally(demoManifest, query));
  await context.close();
});

test('a bad value is named in the message area and the rest still applies', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, `?turnout=${G}:500&margin=all:2`);
  const state = await readPage(page);
  assert.match(state.statusText, /turnout/);
  assert.ok(await page.isVisible('#messages-status .message'));
  assert.equal(await page.inputValue(`#turnout-${gIndex}`), '0', 'the bad key keeps its default');
  assert.equal(await page.inputValue('#margin-all'), '2');
  assertMatchesTally(assert, state, cliTally(demoManifest, 'margin=all:2'));
  // The address bar now links to what is on screen: the valid part only.
  assert.equal(cliTally(demoManifest, scenarioOf(state.search)).csv, cliTally(demoManifest, 'margin=all:2').csv);
  assert.doesNotMatch(state.search, /500/);
  assert.deepEqual(problems, []);
  await context.close();
});

test('an unknown group and an unknown key are reported and ignored', async () => {
  const { page, context } = await openPage(env.browser, env.site, '?margin=nosuchgroup:3,all:-1.5&colour=teal');
  const state = await readPage(page);
  assert.match(state.statusText, /nosuchgroup/);
  assert.match(state.statusText, /colour/);
  assertMatchesTally(assert, state, cliTally(demoManifest, 'margin=all:-1.5'));
  await context.close();
});

test('a preset applies its scenario and Copy link copies the address', async () => {
  const { page, context } = await openPage(env.browser, env.site, '');
  await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: env.site.url.replace(/\/$/, '') });
  const preset = manifest.presets?.[0];
  assert.ok(preset, 'the demo has presets');
  await page.getByRole('button', { name: preset.name, exact: true }).click();
  await page.waitForSelector('#app[data-settled="true"]', { state: 'attached' });
  const state = await readPage(page);
  assertMatchesTally(assert, state, cliTally(demoManifest, preset.scenario));

  await page.click('#copy-link');
  await page.waitForSelector('#messages-status .message');
  const copied = await page.evaluate(() => navigator.clipboard.readText());
  assert.equal(copied, page.url());
  assert.equal(cliTally(demoManifest, scenarioOf(new URL(copied).search)).csv, cliTally(demoManifest, preset.scenario).csv);
  await context.close();
});
