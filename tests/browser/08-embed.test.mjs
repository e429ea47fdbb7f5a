// The embed in an article: the normal page's "copy embed code" gives an iframe snippet;
// a host page on another origin (a second loopback server, another port) carries it.
// The iframe loads, its height message arrives and matches its content, the compact
// layout reads at 320 px with the map in view, and a slider works inside it.
import { test, before, after } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { startServer } from '../static-server.mjs';
import { DEMO, OUTPUT, cliTally, openPage, readJson, scenarioOf, seatsByParty, useSite } from './helpers.mjs';

const env = useSite();
const demo = path.join(DEMO, 'dataset.json');
const manifest = readJson(demo);
const hostDir = path.join(OUTPUT, 'embed-host');
let host = null;

before(async () => {
  fs.mkdirSync(hostDir, { recursive: true });
  host = await startServer({ root: hostDir, port: 0 });
});
after(async () => {
  await host?.close();
});

/** An article with the snippet in the middle of its text; it records the messages it gets. */
function article(snippet) {
  const para = '<p>' + 'The article goes on about the election. '.repeat(12) + '</p>';
  return `<!doctype html><html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>An article</title>
<script>window.__heights = []; addEventListener('message', (e) => { if (e.data && e.data.type) window.__heights.push({ origin: e.origin, data: e.data }); });</script>
<style>body { margin: 0 12px; font: 16px/1.5 serif; }</style></head>
<body><h1>An article</h1>${para}
${snippet}
${para}</body></html>`;
}

test('copied embed code works in an article on another origin, at 320 px', async () => {
  // 1. The normal page's control gives the snippet for the scenario on screen.
  const query = 'margin=all:1.5';
  const { page, context, problems } = await openPage(env.browser, env.site, `?${query}`);
  await page.locator('#embed-box summary').click();
  const shown = [manifest.groups[0], manifest.groups[3]];
  for (const g of shown) await page.check(`#embed-box input[value="${g.id}"]`);
  const snippet = await page.inputValue('#embed-code');
  assert.deepEqual(problems, []);
  await context.close();
  assert.match(snippet, /<iframe [^>]*title="[^"]+"/, 'the iframe has a title for screen readers');
  assert.match(snippet, /sandbox="[^"]*allow-scripts[^"]*"/);
  assert.match(snippet, /embed=1/);
  assert.match(snippet, new RegExp(`show=${shown.map((g) => g.id).join(',')}`));
  assert.match(snippet, /margin=all:1\.5/);
  assert.ok(snippet.includes(new URL(env.site.url).origin), 'the snippet points at the page');

  // 2. The article, on another origin, at a phone's width.
  fs.writeFileSync(path.join(hostDir, 'index.html'), article(snippet));
  assert.notEqual(new URL(host.url).origin, new URL(env.site.url).origin);
  const phone = await env.browser.newContext({ viewport: { width: 320, height: 568 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true });
  const hostPage = await phone.newPage();
  const hostProblems = [];
  hostPage.on('pageerror', (e) => hostProblems.push(e.message));
  await hostPage.goto(new URL('index.html', host.url).href);
  const frameEl = await hostPage.waitForSelector('iframe.stratamap-embed');
  const frame = await frameEl.contentFrame();
  await frame.waitForSelector('#app[data-state="ready"][data-settled="true"]', { state: 'attached' });

  // 3. The height message arrived from the page's origin and the frame is sized to it.
  await hostPage.waitForFunction(() => window.__heights.some((m) => m.data.type === 'stratamap:height'));
  await hostPage.waitForTimeout(300); // let a last layout change post its height
  const { last, frameHeight } = await hostPage.evaluate(() => {
    const msgs = window.__heights.filter((m) => m.data.type === 'stratamap:height');
    return { last: msgs[msgs.length - 1], frameHeight: document.querySelector('iframe.stratamap-embed').getBoundingClientRect().height };
  });
  assert.equal(last.origin, new URL(env.site.url).origin);
  const contentHeight = await frame.evaluate(() => Math.ceil(document.documentElement.getBoundingClientRect().height));
  assert.equal(last.data.height, contentHeight, 'the message gives the content height');
  assert.ok(Math.abs(frameHeight - contentHeight) <= 1, `the frame (${frameHeight}) fits its content (${contentHeight})`);

  // 4. The compact layout: map first, then seats, only the chosen groups, no table, no sideways scroll.
  const layout = await frame.evaluate(() => {
    const top = (sel) => document.querySelector(sel)?.getBoundingClientRect().top ?? null;
    const visible = (sel) => {
      const n = document.querySelector(sel);
      return !!n && n.getClientRects().length > 0 && getComputedStyle(n).visibility !== 'hidden';
    };
    return {
      embed: document.documentElement.dataset.embed,
      map: top('#map'),
      seats: top('#seats'),
      controls: top('#controls'),
      table: visible('#results-table'),
      turnoutSliders: [...document.querySelectorAll('input[type="range"][id^="turnout-"]')].filter((n) => n.getClientRects().length).map((n) => n.id),
      scrollWidth: document.documentElement.scrollWidth,
      clientWidth: document.documentElement.clientWidth,
      caution: document.querySelector('.caution-short')?.textContent ?? '',
    };
  });
  assert.equal(layout.embed, 'true');
  assert.ok(layout.map < layout.seats && layout.seats < layout.controls, `map, seats, controls in that order: ${JSON.stringify(layout)}`);
  assert.equal(layout.table, false, 'no results table');
  assert.deepEqual(layout.turnoutSliders, shown.map((g) => `turnout-${manifest.groups.indexOf(g)}`));
  assert.ok(layout.scrollWidth <= layout.clientWidth, `no sideways scroll at 320 px (${layout.scrollWidth} > ${layout.clientWidth})`);
  assert.match(layout.caution, /not a forecast/);

  // 5. A slider inside works, and while it is in view on the phone, so is part of the map.
  const g = manifest.groups.indexOf(shown[1]);
  const slider = frame.locator(`#margin-${g}`);
  await slider.scrollIntoViewIfNeeded();
  await slider.focus();
  for (let k = 0; k < 20; k += 1) await hostPage.keyboard.press('ArrowLeft');
  await frame.waitForSelector('#app[data-settled="true"]', { state: 'attached' });
  const inView = await hostPage.evaluate(() => {
    const f = document.querySelector('iframe.stratamap-embed');
    const fr = f.getBoundingClientRect();
    const doc = f.contentDocument; // null across origins: the page measures itself below
    return { top: fr.top, doc: doc !== null, vh: innerHeight };
  });
  assert.equal(inView.doc, false, 'the host cannot reach into the frame: another origin');
  const rects = await frame.evaluate((id) => {
    const r = (n) => n.getBoundingClientRect();
    return { map: r(document.getElementById('map')), slider: r(document.getElementById(id)) };
  }, `margin-${g}`);
  const mapTop = inView.top + rects.map.top;
  const mapBottom = inView.top + rects.map.bottom;
  const sliderTop = inView.top + rects.slider.top;
  const sliderBottom = inView.top + rects.slider.bottom;
  assert.ok(sliderTop >= 0 && sliderBottom <= inView.vh, 'the slider is on screen');
  assert.ok(mapBottom > 40 && mapTop < inView.vh, `part of the map is on screen too (map ${mapTop}..${mapBottom}, screen 0..${inView.vh})`);

  const search = await frame.evaluate(() => location.search);
  const scenario = scenarioOf(search);
  assert.match(scenario, new RegExp(`margin=all:1\\.5,${shown[1].id}:-`));
  const seats = await frame.evaluate(() => {
    const out = {};
    for (const row of document.querySelectorAll('.seat-row')) out[row.dataset.party] = Number(row.dataset.seats);
    return out;
  });
  const tally = cliTally(demo, scenario); // the command line takes an embed's link as it is
  assert.deepEqual(seats, seatsByParty(tally), 'seats inside the embed equal the command line');
  const winners = await frame.evaluate(() => [...document.querySelectorAll('#map path.sm-district')].map((p) => p.dataset.winner));
  assert.deepEqual(winners, tally.rows.map((r) => r.winner));
  assert.deepEqual(hostProblems, []);
  await phone.close();
});
