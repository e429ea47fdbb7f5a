// Moving a slider with the pointer and with the keyboard repaints the districts whose
// winner changes, the seats and the address bar; all of it equals `stratamap tally` run
// with the scenario string the address bar then holds.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import path from 'node:path';
import {
  DEMO, openPage, readPage, waitSettled, cliTally, readJson,
  assertMatchesTally, scenarioOf,
  useSite,
} from './helpers.mjs';

const demoManifest = path.join(DEMO, 'dataset.json');
const manifest = readJson(demoManifest);

const env = useSite();

/** Compare before/after against the CLI before/after: the right districts changed fill. */
function assertRepaint(before, afterState, tallyBefore, tallyAfter) {
  const flipped = tallyAfter.rows
    .map((r, i) => (r.winner !== tallyBefore.rows[i].winner ? i : -1))
    .filter((i) => i >= 0);
  assert.ok(flipped.length > 0, 'the move should change at least one winner (else the test proves nothing)');
  for (const i of flipped) {
    assert.notEqual(afterState.fills[i], before.fills[i], `district ${tallyAfter.rows[i].district} changed hands, so its fill changes`);
  }
  return flipped;
}

test('dragging and clicking a slider with the pointer repaints what the CLI says changed', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, '');
  const before = await readPage(page);
  const tallyBefore = cliTally(demoManifest, scenarioOf(before.search));

  // Click at 80% of the "all groups" margin slider's track: about +12 toward the first axis party.
  const slider = page.locator('#margin-all');
  await slider.scrollIntoViewIfNeeded();
  const box = await slider.boundingBox();
  await page.mouse.click(box.x + box.width * 0.8, box.y + box.height / 2);
  await waitSettled(page);
  const clicked = await readPage(page);
  const value = Number(await slider.inputValue());
  assert.ok(value > 5 && value <= 20, `slider moved to ${value}`);
  assert.match(clicked.search, /margin=all(:|%3A)/);
  const tallyClicked = cliTally(demoManifest, scenarioOf(clicked.search));
  assertMatchesTally(assert, clicked, tallyClicked);
  assertRepaint(before, clicked, tallyBefore, tallyClicked);
  assert.equal(await page.textContent('#margin-all-value'), `+${value.toFixed(1)}`);

  // Drag the thumb of the first group's turnout slider to the left end.
  const t0 = page.locator('#turnout-0');
  await t0.scrollIntoViewIfNeeded();
  const tb = await t0.boundingBox();
  await page.mouse.move(tb.x + tb.width / 2, tb.y + tb.height / 2);
  await page.mouse.down();
  for (let k = 1; k <= 10; k += 1) {
    await page.mouse.move(tb.x + tb.width / 2 - (k * tb.width) / 20, tb.y + tb.height / 2);
  }
  await page.mouse.move(tb.x - 20, tb.y + tb.height / 2);
  await page.mouse.up();
  await waitSettled(page);
  assert.equal(Number(await t0.inputValue()), -20);
  const dragged = await readPage(page);
  const group0 = manifest.groups[0].id;
  assert.match(dragged.search, new RegExp(`turnout=${group0}(:|%3A)-20`));
  assertMatchesTally(assert, dragged, cliTally(demoManifest, scenarioOf(dragged.search)));
  assert.deepEqual(problems, []);
  await context.close();
});

test('arrow keys move a focused slider by its step and repaint', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, '');
  // Starting from the baseline makes the link's start key explicit as well.
  await page.check('#start-baseline');
  await waitSettled(page);
  const before = await readPage(page);
  assert.match(before.search, /start=baseline/);
  const tallyBefore = cliTally(demoManifest, scenarioOf(before.search));
  assertMatchesTally(assert, before, tallyBefore);

  // Keyboard: focus the all-groups margin slider and press ArrowRight 16 times (+8 points).
  await page.focus('#margin-all');
  for (let k = 0; k < 16; k += 1) await page.keyboard.press('ArrowRight');
  await waitSettled(page);
  assert.equal(Number(await page.inputValue('#margin-all')), 8);
  assert.equal(await page.textContent('#margin-all-value'), '+8.0');
  const after8 = await readPage(page);
  assert.match(after8.search, /margin=all(:|%3A)8(&|$)/);
  const tallyAfter = cliTally(demoManifest, scenarioOf(after8.search));
  assertMatchesTally(assert, after8, tallyAfter);
  assertRepaint(before, after8, tallyBefore, tallyAfter);

  // And back down with ArrowLeft on a group's turnout slider.
  await page.focus('#turnout-1');
  for (let k = 0; k < 6; k += 1) await page.keyboard.press('ArrowLeft');
  await waitSettled(page);
  const after3 = await readPage(page);
  assert.match(after3.search, new RegExp(`turnout=${manifest.groups[1].id}(:|%3A)-3(&|$|,)`));
  assertMatchesTally(assert, after3, cliTally(demoManifest, scenarioOf(after3.search)));

  // The group's share of voters moved the way the CLI's turnout change implies.
  const weight = await page.textContent('.group[data-group="1"] .weight');
  assert.match(weight, /% of voters \(\u2212/, `group 1 turned out less, so its share fell: ${weight}`);

  // Reset brings the defaults and an empty scenario back.
  await page.click('#reset');
  await waitSettled(page);
  const reset = await readPage(page);
  assert.equal(reset.search, '');
  assertMatchesTally(assert, reset, cliTally(demoManifest, ''));
  assert.deepEqual(problems, []);
  await context.close();
});
