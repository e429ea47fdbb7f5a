// Screenshots at desktop and phone width (written to tests/output/ for a person to look
// at), and the layout checks that can be made by machine: nothing wider than a phone,
// the map before the sliders, and the caution on screen.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { OUTPUT, openPage, showTable, readJson, DEMO, useSite } from './helpers.mjs';


fs.mkdirSync(OUTPUT, { recursive: true });
const env = useSite();

const g = readJson(path.join(DEMO, 'dataset.json')).groups[0].id;
const scenario = `?turnout=${g}:-6&margin=all:1.5`;

test('desktop 1280x900', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, scenario, { viewport: { width: 1280, height: 900 } });
  // Bring the results table in (it refreshes while on screen), then back to the top.
  await showTable(page);
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.focus('#map path[data-i="2"]');
  await page.screenshot({ path: path.join(OUTPUT, 'desktop.png') });
  await page.screenshot({ path: path.join(OUTPUT, 'desktop-full.png'), fullPage: true });
  const layout = await page.evaluate(() => {
    const r = (s) => document.querySelector(s).getBoundingClientRect();
    return { map: r('.map-panel'), controls: r('#controls'), caution: r('header .caution'), width: document.documentElement.scrollWidth };
  });
  assert.ok(layout.controls.left >= layout.map.right, 'two columns: the controls beside the map');
  assert.ok(layout.caution.top < 900 && layout.caution.bottom > 0, 'caution on the first screen');
  assert.ok(layout.width <= 1280);
  assert.deepEqual(problems, []);
  await context.close();
});

test('phone 375x812', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, scenario, { viewport: { width: 375, height: 812 } });
  await showTable(page);
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot({ path: path.join(OUTPUT, 'phone.png') });
  await page.screenshot({ path: path.join(OUTPUT, 'phone-full.png'), fullPage: true });
  const layout = await page.evaluate(() => {
    const r = (s) => document.querySelector(s).getBoundingClientRect();
    return {
      map: r('#map svg'), controls: r('#controls'), summary: r('#summary'), caution: r('header .caution'),
      width: document.documentElement.scrollWidth,
    };
  });
  assert.ok(layout.width <= 375, `no sideways scrolling at 375 px (page is ${layout.width} px wide)`);
  assert.ok(layout.map.bottom <= layout.controls.top, 'single column, map first, sliders below');
  assert.ok(layout.map.width >= 300, 'the map uses the width');
  assert.ok(layout.caution.top < 812, 'caution on the first screen');
  // A thumb-sized target for each slider.
  const h = await page.$eval('#margin-all', (n) => n.getBoundingClientRect().height);
  assert.ok(h >= 24, `slider is ${h} px tall`);
  await page.locator('#controls').screenshot({ path: path.join(OUTPUT, 'phone-controls.png') });
  await page.locator('#summary').screenshot({ path: path.join(OUTPUT, 'phone-summary.png') });
  assert.deepEqual(problems, []);
  await context.close();
});
