// stratamap page: wires the WebAssembly engine to the panels. The engine does all the
// arithmetic; this file loads a dataset, applies the link's scenario, and repaints.
//
// Panels are separate modules with the same small interface (setDataset, then render/
// refresh), so later panels (simulation, opening your own files, an embed mode that hides
// the controls) slot in here without touching the others.
import init, { lastPanic } from './pkg/stratamap.js';
import { byId, debounce, el, replaceChildren, fmt1 } from './dom.js';
import { DEFAULT_DATA, splitSearch, allowedOrigins, writeAddress, buildSearch } from './link.js';
import { fetchDataset, engineFromTexts } from './loader.js';
import { showMessages, clearMessages } from './messages.js';
import { DistrictMap, renderLegend } from './map.js';
import { DetailsPanel } from './details.js';
import { Controls } from './controls.js';
import { SummaryPanel } from './summary.js';
import { renderCurve, renderPlane } from './charts.js';
import { ResultsTable, downloadCsv } from './table.js';

const SETTLE_MS = 150;

const app = byId('app');
const state = {
  engine: null,
  info: null,
  palette: null,
  dataParam: DEFAULT_DATA,
  summary: null,
};

const details = new DetailsPanel(byId('details'));
const map = new DistrictMap(byId('map'), (i) => details.show(i));
const summaryPanel = new SummaryPanel();
const table = new ResultsTable(byId('results-table'));
const controls = new Controls(byId('controls-body'), {
  onChange: () => update(),
  onPreset: (preset) => applyScenario(preset.scenario, `The preset "${preset.name}"`),
  onReset: () => applyScenario('', null),
});

/** Work that can wait until the sliders stop: the curve, the plane and the table. */
const settle = debounce(() => {
  const { engine, info } = state;
  if (!engine) return;
  try {
    summaryPanel.renderChanged(state.summary.changed);
    renderCurve(byId('curve'), engine.curve(), info);
    renderPlane(byId('plane'), engine.plane(), info);
    table.invalidate();
    app.dataset.settled = 'true';
  } catch (e) {
    reportBug(e);
  }
}, SETTLE_MS);

function reportBug(e) {
  console.error(e);
  const panic = lastPanic();
  const lines = [String(e.message ?? e)];
  if (panic) lines.push(`The engine stopped: ${panic}. Reload the page to start again.`);
  showMessages('bug', 'error', 'Something went wrong while updating the page.', lines);
}

/**
 * Keep the address bar a link to what is on screen. Browsers limit how often a page may
 * rewrite its address, so a fast drag writes at most every ADDRESS_MS, and the last
 * value always lands.
 */
const ADDRESS_MS = 120;
let lastAddressAt = -Infinity;
let addressTimer = null;
function address() {
  const write = () => {
    addressTimer = null;
    lastAddressAt = performance.now();
    if (!state.engine) return;
    writeAddress(state.dataParam, state.engine.scenarioQuery());
    byId('link-field').value = location.href;
  };
  const wait = lastAddressAt + ADDRESS_MS - performance.now();
  if (wait <= 0) write();
  else if (addressTimer === null) addressTimer = setTimeout(write, wait);
}

/** Repaint everything that must follow a slider at once, then schedule the rest. */
function update() {
  const { engine, info, palette } = state;
  if (!engine) return;
  app.dataset.settled = 'false';
  try {
    const summary = engine.summary();
    state.summary = summary;
    const winners = engine.winners();
    map.paint(palette, engine.fills(), winners, summary.tipping);
    summaryPanel.render(summary, winners, engine.margins());
    controls.showWeights(summary);
    if (details.index !== null) details.refresh();
    showMoe(info, summary);
    address();
  } catch (e) {
    reportBug(e);
  }
  settle();
}

/**
 * Reset, then apply a scenario string (from the link, a preset, or '' for reset).
 * Problems are shown in the message area, naming where the string came from.
 */
function applyScenario(query, origin) {
  const { engine } = state;
  // The string replaces the whole scenario: '' is the reset (poll start, sliders at 0).
  const problems = engine.setScenario(query);
  if (problems.length) {
    showMessages(
      'scenario',
      'status',
      `${origin ?? 'The scenario'} has values that could not be used; the rest applies:`,
      problems.map((p) => `${p.key}: ${p.message}`),
    );
  } else {
    clearMessages('scenario');
  }
  controls.sync(engine.scenario());
  update();
}

function showMoe(info, summary) {
  const node = byId('moe-line');
  const moes = info.groups
    .map((g) => g.poll?.margin_moe)
    .filter((v) => v !== null && v !== undefined && Number.isFinite(v));
  const parts = [];
  if (moes.length) {
    const lo = Math.min(...moes);
    const hi = Math.max(...moes);
    const range = lo === hi ? `\u00b1${fmt1(lo)}` : `\u00b1${fmt1(lo)} to \u00b1${fmt1(hi)}`;
    parts.push(`Poll margin of error (95%) on each group's margin: ${range} points.`);
  }
  if (summary.shares_moe) {
    const top = Math.max(...summary.shares_moe);
    parts.push(`Nationwide shares: up to \u00b1${fmt1(top)} points.`);
  }
  const text = parts.join(' ');
  if (node.textContent !== text) node.textContent = text;
  node.hidden = text === '';
}

/** Swap in a freshly built engine and rebuild the panels for its dataset. */
function adopt(engine, dataParam) {
  const old = state.engine;
  const info = engine.info();
  state.engine = engine;
  state.info = info;
  state.palette = engine.palette();
  state.dataParam = dataParam;

  byId('dataset-title').textContent = info.title;
  byId('dataset-source').textContent = info.source;
  for (const node of document.querySelectorAll('.caution-text')) node.textContent = info.caution;
  // The map's caption carries the caution's first clause and the source line.
  const short = info.caution.split(/[:.]/)[0].trim();
  for (const node of document.querySelectorAll('.caution-short')) node.textContent = `${short}.`;
  for (const node of document.querySelectorAll('.source-short')) node.textContent = info.source;
  document.title = `${info.title} \u2013 stratamap`;

  map.mount(engine, info);
  renderLegend(byId('legend'), info, state.palette);
  details.setDataset(engine, info);
  controls.setDataset(engine, info);
  summaryPanel.setDataset(engine, info);
  table.setDataset(engine, info);
  app.dataset.districts = String(info.districts.length);
  if (old && typeof old.free === 'function') old.free();
}

/**
 * Open the dataset at dataParam and apply scenarioQuery. On failure, show why and keep
 * whatever dataset is on screen. Resolves to true when the new dataset is on screen.
 */
async function openDataset(dataParam, scenarioQuery) {
  app.dataset.state = state.engine ? 'ready' : 'loading';
  let engine;
  try {
    const { texts } = await fetchDataset(dataParam, {
      base: location.href,
      pageOrigin: location.origin,
      allowed: allowedOrigins(),
    });
    engine = engineFromTexts(texts);
  } catch (e) {
    const lines = String(e.message ?? e).split('\n').filter(Boolean);
    showMessages('dataset', 'error', `The dataset "${dataParam}" could not be opened.`, lines);
    if (!state.engine) {
      app.dataset.state = 'error';
      showFallback();
    }
    return false;
  }
  clearMessages('dataset');
  adopt(engine, dataParam);
  app.dataset.state = 'ready';
  applyScenario(scenarioQuery, 'The link');
  return true;
}

/** When the first dataset fails: say so where the map would be, and offer the demo. */
function showFallback() {
  byId('dataset-title').textContent = 'No dataset open';
  replaceChildren(
    byId('map'),
    el(
      'p',
      { class: 'map-empty' },
      'No map to show. ',
      el('a', { href: `${location.pathname}${buildSearch(DEFAULT_DATA, '')}` }, 'Open the demo dataset'),
      '.',
    ),
  );
}

async function copyLink() {
  const field = byId('link-field');
  field.value = location.href;
  try {
    await navigator.clipboard.writeText(location.href);
    showMessages('copy', 'status', 'Link copied: it opens this dataset with the scenario on screen.', []);
  } catch {
    field.hidden = false;
    field.focus();
    field.select();
    showMessages('copy', 'status', 'Copying was not allowed here: the link is selected in the field, copy it with Ctrl+C or \u2318C.', []);
  }
}

function wireStaticButtons() {
  byId('copy-link').addEventListener('click', copyLink);
  byId('download-csv').addEventListener('click', () => {
    if (state.engine) downloadCsv(state.engine.tallyCsv());
  });
}

async function main() {
  wireStaticButtons();
  try {
    await init();
  } catch (e) {
    app.dataset.state = 'error';
    showMessages('engine', 'error', 'The map engine could not start in this browser.', [String(e.message ?? e)]);
    return;
  }
  const { page, scenario } = splitSearch(location.search);
  const dataParam = page.data ? page.data : DEFAULT_DATA;
  await openDataset(dataParam, scenario);
}

main();
