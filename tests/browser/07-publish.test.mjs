// The page's downloads, parsed: the map as SVG (the same bytes as `stratamap render`)
// and as PNG at twice the screen's resolution, the CSV with its CSV on the Web metadata
// (the same bytes as `stratamap tally --metadata`), and the scenario as JSON; each
// carries the title, the source, the scenario in words and the caution.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { CLI, DEMO, openPage, parseCsv, readJson, scenarioOf, useSite, waitSettled } from './helpers.mjs';

const env = useSite();
const demo = path.join(DEMO, 'dataset.json');
const manifest = readJson(demo);

function cli(args) {
  const run = spawnSync(CLI, args, { encoding: 'utf8' });
  if (run.error) throw run.error;
  assert.equal(run.status, 0, `stratamap ${args.join(' ')}: ${run.stderr}`);
  return run;
}

async function download(page, selector) {
  const [dl] = await Promise.all([page.waitForEvent('download'), page.click(selector)]);
  return { name: dl.suggestedFilename(), bytes: fs.readFileSync(await dl.path()) };
}

/** Width and height from a PNG's IHDR chunk (PNG specification, W3C 2003, section 11.2.2). */
function pngSize(bytes) {
  const signature = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  assert.deepEqual([...bytes.subarray(0, 8)], signature, 'PNG signature');
  assert.equal(bytes.subarray(12, 16).toString('latin1'), 'IHDR');
  return { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };
}

test('every download carries title, source, scenario in words and caution, and matches the command line', async () => {
  const g = manifest.groups[2];
  const query = `turnout=${g.id}:-4.5&margin=all:1.5`;
  const { page, context, problems } = await openPage(env.browser, env.site, `?${query}`);
  await page.locator('#export-svg').scrollIntoViewIfNeeded();
  const caution = JSON.parse(cli(['scenario', demo]).stdout).caution;
  assert.equal((await page.textContent('.exports .export-caution')).trim(), caution, 'the caution stands beside the buttons');
  const search = await page.evaluate(() => location.search);
  const scenario = scenarioOf(search);
  assert.equal(scenario, query);

  // SVG: the same document as `stratamap render`, and well-formed XML with what it must say.
  const svg = await download(page, '#export-svg');
  assert.equal(svg.name, 'stratamap-map.svg');
  const svgText = svg.bytes.toString('utf8');
  assert.equal(svgText, cli(['render', demo, '--scenario', scenario]).stdout);
  const words = JSON.parse(cli(['scenario', demo, '--scenario', scenario]).stdout).in_words;
  const parsed = await page.evaluate((text) => {
    const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
    return {
      error: doc.querySelector('parsererror')?.textContent ?? null,
      root: doc.documentElement.localName,
      width: Number(doc.documentElement.getAttribute('width')),
      height: Number(doc.documentElement.getAttribute('height')),
      text: [...doc.querySelectorAll('text')].map((t) => t.textContent.trim()).join(' '),
      districts: doc.querySelectorAll('path.sm-district').length,
    };
  }, svgText);
  assert.equal(parsed.error, null);
  assert.equal(parsed.root, 'svg');
  assert.equal(parsed.districts, 96);
  for (const needle of [manifest.title, manifest.source, caution, ...words, 'a majority is']) {
    assert.ok(parsed.text.replace(/\s+/g, ' ').includes(needle.replace(/\s+/g, ' ')), `the SVG says "${needle}"`);
  }
  assert.ok(!parsed.text.includes(query), 'the scenario is written in words, not as the raw string');

  // PNG: twice the SVG's size at a device pixel ratio of 1, and a picture, not a blank.
  const png = await download(page, '#export-png');
  assert.equal(png.name, 'stratamap-map.png');
  const size = pngSize(png.bytes);
  assert.equal(size.width, Math.round(parsed.width * 2));
  assert.equal(size.height, Math.round(parsed.height * 2));
  const colours = await page.evaluate(async (b64) => {
    const blob = await (await fetch(`data:image/png;base64,${b64}`)).blob();
    const bmp = await createImageBitmap(blob);
    const c = new OffscreenCanvas(bmp.width, bmp.height);
    const ctx = c.getContext('2d');
    ctx.drawImage(bmp, 0, 0);
    const data = ctx.getImageData(0, 0, bmp.width, bmp.height).data;
    const seen = new Set();
    for (let i = 0; i < data.length; i += 4 * 97) seen.add((data[i] << 16) | (data[i + 1] << 8) | data[i + 2]);
    return seen.size;
  }, png.bytes.toString('base64'));
  assert.ok(colours > 8, `the PNG shows a map (${colours} colours sampled)`);

  // CSV and its CSVW metadata: the same bytes as the command line's.
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'stratamap-publish-'));
  const metaFile = path.join(dir, 'stratamap-tally.csv-metadata.json');
  const tally = cli(['tally', demo, '--scenario', scenario, '--metadata', metaFile]);
  const csv = await download(page, '#download-csv');
  assert.equal(csv.name, 'stratamap-tally.csv');
  assert.equal(csv.bytes.toString('utf8'), tally.stdout);
  const csvw = await download(page, '#export-csvw');
  assert.equal(csvw.name, 'stratamap-tally.csv-metadata.json');
  assert.equal(csvw.bytes.toString('utf8'), fs.readFileSync(metaFile, 'utf8'));
  const meta = JSON.parse(csvw.bytes.toString('utf8'));
  // W3C "Metadata Vocabulary for Tabular Data" (2015): the table's url and its columns in order.
  assert.equal(meta['@context'][0], 'http://www.w3.org/ns/csvw');
  assert.equal(meta.url, 'stratamap-tally.csv');
  assert.deepEqual(meta.tableSchema.columns.map((c) => c.titles), tally.stdout.split('\n')[0].split(','));
  assert.equal(meta['rdfs:comment'], caution);
  assert.equal(meta['dc:source'], manifest.source);
  assert.equal(meta['prov:wasGeneratedBy']['rdf:value'], scenario);
  assert.equal(meta['dc:description'], words.join(' '));

  // The scenario as JSON: every value, the link on screen, title and source.
  const json = await download(page, '#export-json');
  assert.equal(json.name, 'stratamap-scenario.json');
  const s = JSON.parse(json.bytes.toString('utf8'));
  assert.equal(s.link, await page.evaluate(() => location.href));
  assert.equal(s.scenario, scenario);
  assert.equal(s.turnout.groups[g.id], -4.5);
  assert.equal(s.margin.all, 1.5);
  assert.equal(s.title, manifest.title);
  assert.equal(s.source, manifest.source);
  assert.equal(s.caution, caution);
  assert.deepEqual({ ...s, link: null }, JSON.parse(cli(['scenario', demo, '--scenario', scenario]).stdout));

  // After a slider moves, the files follow the scenario on screen.
  await page.focus('#turnout-all');
  for (let k = 0; k < 4; k += 1) await page.keyboard.press('ArrowRight');
  await waitSettled(page);
  const moved = scenarioOf(await page.evaluate(() => location.search));
  assert.notEqual(moved, scenario);
  const svg2 = await download(page, '#export-svg');
  assert.equal(svg2.bytes.toString('utf8'), cli(['render', demo, '--scenario', moved]).stdout);
  assert.deepEqual(problems, []);
  await context.close();
});

/** The CLI's what-it-takes sentences per group id. */
function cliSentences(scenario) {
  const [header, ...rows] = parseCsv(cli(['tally', demo, '--scenario', scenario, '--what-it-takes']).stdout);
  const at = header.indexOf('sentence');
  const out = {};
  for (const r of rows) if (r.length > at) (out[r[0]] ??= []).push(r[at]);
  return out;
}

test('what it would take: a sentence beside each group, the same as the command line', async () => {
  const { page, context, problems } = await openPage(env.browser, env.site, '?start=baseline');
  const read = () =>
    page.evaluate(() =>
      [...document.querySelectorAll('.reach[data-group]')].map((n) => ({
        group: Number(n.dataset.group),
        lines: [...n.querySelectorAll('.reach-line')].map((l) => l.textContent.trim()),
      })),
    );
  const check = (shown, expected) => {
    assert.equal(shown.filter((s) => s.group >= 0).length, manifest.groups.length, 'one per group');
    for (const s of shown) {
      const id = s.group < 0 ? 'all' : manifest.groups[s.group].id;
      assert.ok(s.lines.length >= 1, `${id} has a sentence`);
      for (const line of s.lines) assert.ok(expected[id]?.includes(line), `${id}: "${line}" is one of the CLI's ${JSON.stringify(expected[id])}`);
    }
  };
  const before = await read();
  check(before, cliSentences('start=baseline'));
  // Sliders settle, sentences follow.
  await page.focus('#margin-0');
  for (let k = 0; k < 30; k += 1) await page.keyboard.press('ArrowLeft');
  await waitSettled(page);
  const after = await read();
  const moved = scenarioOf(await page.evaluate(() => location.search));
  assert.notEqual(moved, 'start=baseline');
  check(after, cliSentences(moved));
  assert.notDeepEqual(after, before);
  assert.deepEqual(problems, []);
  await context.close();
});
