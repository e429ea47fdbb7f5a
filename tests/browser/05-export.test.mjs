// "Download CSV" gives exactly what `stratamap tally` prints for the scenario on screen.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import {
  DEMO, FIXTURES, openPage, readPage, waitSettled, cliTally, readJson, scenarioOf,
  useSite,
} from './helpers.mjs';


const env = useSite();

async function download(page) {
  const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#download-csv')]);
  assert.equal(dl.suggestedFilename(), 'stratamap-tally.csv');
  return fs.readFileSync(await dl.path(), 'utf8');
}

test('the exported CSV equals the CLI byte for byte (demo, after moving sliders)', async () => {
  const demo = path.join(DEMO, 'dataset.json');
  const g = readJson(demo).groups[2].id;
  const { page, context } = await openPage(env.browser, env.site, `?turnout=${g}:-4.5&margin=all:1.5`);
  assert.equal(await download(page), cliTally(demo, `turnout=${g}:-4.5&margin=all:1.5`).csv);

  await page.focus('#turnout-all');
  for (let k = 0; k < 5; k += 1) await page.keyboard.press('ArrowRight');
  await waitSettled(page);
  const state = await readPage(page);
  assert.equal(await download(page), cliTally(demo, scenarioOf(state.search)).csv);
  await context.close();
});

test('the exported CSV equals the CLI for names that need quoting', async () => {
  const dir = path.join(FIXTURES, 'hostile');
  const { page, context } = await openPage(env.browser, env.site, '?data=test-fixtures/hostile/dataset.json&start=baseline');
  const csv = await download(page);
  assert.equal(csv, cliTally(dir, 'start=baseline').csv);
  assert.match(csv, /""/, 'a name with quotes is quoted in the CSV');
  await context.close();
});
