// Benchmark of the page in headless Chromium (not a test: it prints figures).
//
//   node tests/bench/bench.mjs [DATASET_DIR...]
//
// Default datasets: the demo (web/maps-demo) and, when present, /tmp/bench-3000, made by
//   cargo run -p stratamap-demo --release -- --out /tmp/bench-3000 --districts 3000 --groups 24 --parties 4
//
// For each dataset it measures:
//  - first map paint: from navigation start to the first frame after the map has its fills;
//  - slider input -> repainted map, over MOVES moves: the input event's handler (engine call
//    and DOM updates) and the time to the next frame after it (requestAnimationFrame, then
//    a task, so the frame's style, layout and paint are done), p50 and p95;
//  - the deferred work after the sliders stop (curve and plane; the results table is
//    refreshed only while on screen, and is off screen here);
// and once: the gzipped size of web/pkg/*.wasm and of the page's JavaScript.
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';
import { startServer } from '../static-server.mjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const ROOT = path.resolve(here, '..', '..');
const WEB = path.join(ROOT, 'web');
const MOVES = Number(process.env.BENCH_MOVES ?? 100);
const SETTLES = Number(process.env.BENCH_SETTLES ?? 10);
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--no-first-run'];

function quantile(sorted, q) {
  if (!sorted.length) return NaN;
  const pos = (sorted.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return sorted[lo] + (sorted[hi] - sorted[lo]) * (pos - lo);
}

function stats(values) {
  const s = [...values].sort((a, b) => a - b);
  return { p50: quantile(s, 0.5), p95: quantile(s, 0.95), max: s[s.length - 1], n: s.length };
}

const ms = (v) => `${v.toFixed(1)} ms`;
const kib = (n) => `${(n / 1024).toFixed(1)} KiB`;

function gzipSize(files) {
  let raw = 0;
  let gz = 0;
  for (const f of files) {
    const buf = fs.readFileSync(f);
    raw += buf.length;
    gz += zlib.gzipSync(buf, { level: 9 }).length;
  }
  return { raw, gz };
}

function sizes() {
  const pkg = path.join(WEB, 'pkg');
  const wasm = fs.readdirSync(pkg).filter((f) => f.endsWith('.wasm')).map((f) => path.join(pkg, f));
  const glue = fs.readdirSync(pkg).filter((f) => f.endsWith('.js')).map((f) => path.join(pkg, f));
  const page = fs.readdirSync(WEB).filter((f) => f.endsWith('.js')).map((f) => path.join(WEB, f));
  const rest = ['index.html', 'style.css'].map((f) => path.join(WEB, f));
  return { wasm: gzipSize(wasm), js: gzipSize([...glue, ...page]), htmlCss: gzipSize(rest) };
}

async function benchDataset(browser, site, label, dataParam) {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  // Note the first frame after the map has fills, measured from navigation start.
  await page.addInitScript(() => {
    const observer = new MutationObserver(() => {
      if (document.querySelector('#map path.sm-district[data-winner]')) {
        observer.disconnect();
        requestAnimationFrame(() => setTimeout(() => {
          window.__firstMapPaint = performance.now();
        }, 0));
      }
    });
    observer.observe(document, { subtree: true, childList: true, attributes: true, attributeFilter: ['data-winner'] });
  });
  const query = dataParam ? `?data=${encodeURIComponent(dataParam)}` : '';
  await page.goto(`${site.url}${query}`);
  await page.waitForSelector('#app[data-state="ready"][data-settled="true"]', { state: 'attached', timeout: 120_000 });
  await page.waitForFunction(() => window.__firstMapPaint !== undefined);
  const firstPaint = await page.evaluate(() => window.__firstMapPaint);
  const districts = await page.locator('#map path.sm-district').count();
  const groups = await page.locator('.group[data-group]').count() - 1;

  // Slider moves: alternate between the all-groups margin slider and two groups' turnout.
  const moves = await page.evaluate(async (n) => {
    const sliders = ['#margin-all', '#turnout-0', '#margin-1'].map((s) => document.querySelector(s)).filter(Boolean);
    const frame = () => new Promise((resolve) => requestAnimationFrame(() => setTimeout(resolve, 0)));
    await frame();
    const handler = [];
    const painted = [];
    for (let k = 0; k < n; k += 1) {
      const input = sliders[k % sliders.length];
      const v = ((k * 7) % 41) - 20; // -20..20, jumping about
      const t0 = performance.now();
      input.value = String(v / 2);
      input.dispatchEvent(new Event('input', { bubbles: true }));
      const t1 = performance.now();
      await frame();
      const t2 = performance.now();
      handler.push(t1 - t0);
      painted.push(t2 - t0);
    }
    return { handler, painted };
  }, MOVES);

  // The work deferred until the sliders stop (after the page's 150 ms quiet period).
  const settles = [];
  for (let k = 0; k < SETTLES; k += 1) {
    const t = await page.evaluate(async (v) => {
      const app = document.getElementById('app');
      const input = document.querySelector('#margin-all');
      input.value = String(v);
      input.dispatchEvent(new Event('input', { bubbles: true }));
      const t0 = performance.now();
      await new Promise((resolve) => {
        const check = () => (app.dataset.settled === 'true' ? resolve() : setTimeout(check, 1));
        check();
      });
      return performance.now() - t0;
    }, (k % 2 ? 3 : -3) + k * 0.5);
    settles.push(t);
  }
  await context.close();
  return { label, districts, groups, firstPaint, handler: stats(moves.handler), painted: stats(moves.painted), settle: stats(settles), errors };
}

async function main() {
  const args = process.argv.slice(2);
  const datasets = [];
  if (args.length) {
    args.forEach((dir, k) => datasets.push({ label: path.basename(path.resolve(dir)), dir: path.resolve(dir), mount: `/bench-data/${k}/` }));
  } else {
    datasets.push({ label: 'demo', dir: null });
    if (fs.existsSync('/tmp/bench-3000/dataset.json')) {
      datasets.push({ label: 'bench-3000', dir: '/tmp/bench-3000', mount: '/bench-data/0/' });
    } else {
      console.log('(no /tmp/bench-3000: generate it with');
      console.log('  cargo run -p stratamap-demo --release -- --out /tmp/bench-3000 --districts 3000 --groups 24 --parties 4)');
    }
  }
  const mounts = Object.fromEntries(datasets.filter((d) => d.dir).map((d) => [d.mount, d.dir]));
  const site = await startServer({ root: WEB, port: 0, mounts });
  const browser = await chromium.launch({ executablePath: process.env.CHROMIUM ?? '/usr/bin/chromium', args: ARGS });
  try {
    console.log(`stratamap page benchmark: headless Chromium ${browser.version()}, ${MOVES} slider moves per dataset`);
    for (const d of datasets) {
      const r = await benchDataset(browser, site, d.label, d.dir ? `${d.mount.slice(1)}dataset.json` : null);
      console.log(`\n${r.label}: ${r.districts} districts, ${r.groups} groups`);
      console.log(`  first map paint (from navigation start): ${ms(r.firstPaint)}`);
      console.log(`  slider input -> handler done:    p50 ${ms(r.handler.p50)}  p95 ${ms(r.handler.p95)}  max ${ms(r.handler.max)}`);
      console.log(`  slider input -> map repainted:   p50 ${ms(r.painted.p50)}  p95 ${ms(r.painted.p95)}  max ${ms(r.painted.max)}`);
      console.log(`  after the last input, curve + plane drawn (incl. the 150 ms wait; the table refreshes only on screen): p50 ${ms(r.settle.p50)}  p95 ${ms(r.settle.p95)} (n=${r.settle.n})`);
      if (r.errors.length) console.log(`  page errors: ${r.errors.join('; ')}`);
    }
    const s = sizes();
    console.log('\ntransfer sizes (gzip -9):');
    console.log(`  web/pkg/*.wasm:            ${kib(s.wasm.gz)} (raw ${kib(s.wasm.raw)})`);
    console.log(`  JavaScript (pkg + page):   ${kib(s.js.gz)} (raw ${kib(s.js.raw)})`);
    console.log(`  index.html + style.css:    ${kib(s.htmlCss.gz)} (raw ${kib(s.htmlCss.raw)})`);
  } finally {
    await browser.close();
    await site.close();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
