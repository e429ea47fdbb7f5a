// The simulated runs panel: the assumptions (each in the share link, with a sentence
// saying what it means for a reader), progress with a stop button, and what the runs
// show: majorities in words, a seat histogram per party with the majority line, the
// districts most often at the tipping point and the nationwide share ranges. Every
// number is a count or share of runs, worked out by the engine (results.view()).
import { el, svgEl, replaceChildren, setTextIfChanged, fmtInt, fmt1 } from './dom.js';

/** The assumptions, in the order shown, with their ranges (SPEC 3) and sentences. */
export const ASSUMPTIONS = [
  {
    key: 'turnout_sd',
    label: 'Turnout error (points)',
    min: 0,
    max: 25,
    step: 0.5,
    fallback: 3,
    sentence: (v) =>
      v === 0
        ? 'Turnout is taken as given: no run changes how many in a group vote.'
        : `In about two runs of three, each group's turnout lands within ${fmt1(v)} points of the scenario's.`,
  },
  {
    key: 'turnout_corr',
    label: 'How much turnout errors move together (0 to 1)',
    min: 0,
    max: 1,
    step: 0.05,
    fallback: 0.5,
    sentence: (v) =>
      v >= 0.99
        ? 'Every group turns out higher or lower together, as when a whole electorate is more or less motivated.'
        : v <= 0.01
          ? 'Each group’s turnout errs on its own, independently of the others.'
          : `Groups’ turnout errors partly move together (${fmt1(v * 100)}% of their variation is shared).`,
  },
  {
    key: 'margin_sd',
    label: 'Shared poll error (points)',
    min: 0,
    max: 25,
    step: 0.5,
    fallback: 2,
    sentence: (v) =>
      v === 0
        ? 'The poll is taken to have no error common to every group.'
        : `In about two runs of three the poll is off by up to ${fmt1(v)} points on the margin in the same direction for every group and district.`,
  },
  {
    key: 'district_sd',
    label: 'District noise (points)',
    min: 0,
    max: 25,
    step: 0.5,
    fallback: 3,
    sentence: (v) =>
      v === 0
        ? 'Districts follow the groups exactly: no local surprises.'
        : `In about two runs of three each district’s margin lands within ${fmt1(v)} points of what its groups give, for local reasons of its own.`,
  },
  {
    key: 'runs',
    label: 'Runs',
    min: 0,
    max: 100000,
    step: 250,
    fallback: 2000,
    sentence: (v) =>
      v === 0
        ? 'No simulation.'
        : `${fmtInt(v)} simulated runs. More runs make the counts steadier, not the assumptions truer.`,
  },
  {
    key: 'seed',
    label: 'Seed',
    min: 0,
    max: 9007199254740991,
    step: 1,
    fallback: 20261201,
    sentence: () => 'The same seed and link give the same runs on every machine; another seed gives other runs that should tell the same story.',
  },
];

/** Runs when the link does not say (the command line's default too). */
export const DEFAULT_RUNS = 2000;

function histogram(party, seats, majority, view) {
  const h = seats.histogram;
  const W = 320;
  const H = 90;
  const pad = 18;
  const bins = h.counts.length;
  const top = Math.max(1, ...h.counts);
  const bw = (W - 2) / Math.max(1, bins);
  const bars = h.counts.map((c, i) =>
    svgEl('rect', {
      x: (1 + i * bw).toFixed(2),
      y: (H - pad - (c / top) * (H - pad - 6)).toFixed(2),
      width: Math.max(0.5, bw - (bw > 3 ? 1 : 0)).toFixed(2),
      height: ((c / top) * (H - pad - 6)).toFixed(2),
      fill: party.color,
    }),
  );
  const lo = h.start;
  const hi = h.start + bins * h.width;
  const children = [...bars];
  if (majority >= lo && majority <= hi) {
    const x = 1 + ((majority - lo) / h.width) * bw;
    children.push(
      svgEl('line', { class: 'majority-line', x1: x, x2: x, y1: 2, y2: H - pad + 2 }),
      svgEl('text', { class: 'hist-label', x: Math.min(W - 4, x + 3), y: 10 }, `majority ${fmtInt(majority)}`),
    );
  }
  children.push(
    svgEl('text', { class: 'hist-axis', x: 1, y: H - 4 }, `${fmtInt(lo)} seats`),
    svgEl('text', { class: 'hist-axis', x: W - 1, y: H - 4, 'text-anchor': 'end' }, `${fmtInt(hi - 1)}`),
  );
  const label = `${party.name}: seats in ${fmtInt(view.runs_done)} runs, from ${fmtInt(lo)} to ${fmtInt(hi - 1)}; half the runs at ${fmtInt(seats.p50)} or fewer; the majority line at ${fmtInt(majority)}.`;
  return svgEl('svg', { class: 'histogram', viewBox: `0 0 ${W} ${H}`, role: 'img', 'aria-label': label }, svgEl('title', null, label), ...children);
}

export class SimulationPanel {
  /**
   * root: the panel's element. hooks: {onAssumption(key, value), onStop(), onStart(),
   * onDownload()}.
   */
  constructor(root, hooks) {
    this.root = root;
    this.hooks = hooks;
    this.inputs = new Map();
    this.build();
  }

  build() {
    const fields = ASSUMPTIONS.map((a) => {
      const id = `sim-${a.key}`;
      const input = el('input', {
        id,
        type: 'number',
        min: a.min,
        max: a.max,
        step: a.step,
        value: a.fallback,
        inputmode: a.step < 1 ? 'decimal' : 'numeric',
        'aria-describedby': `${id}-says`,
      });
      const says = el('p', { id: `${id}-says`, class: 'note assumption-says' });
      input.addEventListener('change', () => {
        const v = Number(input.value);
        if (input.value === '' || !Number.isFinite(v)) return;
        this.hooks.onAssumption(a.key, input.value.trim());
      });
      this.inputs.set(a.key, { input, says, a });
      return el('div', { class: 'assumption' }, el('label', { for: id }, a.label), input, says);
    });
    this.progress = el('progress', { id: 'sim-progress', max: 1, value: 0, 'aria-label': 'Simulated runs done' });
    this.progressText = el('span', { id: 'sim-progress-text', class: 'sim-progress-text' });
    this.stopButton = el('button', { type: 'button', id: 'sim-stop', onclick: () => this.hooks.onStop() }, 'Stop');
    this.startButton = el('button', { type: 'button', id: 'sim-start', onclick: () => this.hooks.onStart() }, 'Run again');
    this.downloadButton = el(
      'button',
      { type: 'button', id: 'download-simulation', onclick: () => this.hooks.onDownload(), disabled: true },
      'Download the simulation',
    );
    this.caution = el('p', { class: 'caution sim-caution' });
    this.majorities = el('ul', { id: 'sim-majorities', class: 'sim-majorities' });
    this.histograms = el('div', { id: 'sim-histograms', class: 'sim-histograms' });
    this.tipping = el('ol', { id: 'sim-tipping', class: 'sim-tipping' });
    this.shares = el('ul', { id: 'sim-shares', class: 'sim-shares' });
    replaceChildren(
      this.root,
      el('h2', { id: 'sim-heading' }, 'Simulated runs'),
      this.caution,
      el('details', { class: 'assumptions', open: true }, el('summary', null, 'Assumed errors'), el('div', { class: 'assumption-grid' }, fields)),
      el('div', { class: 'sim-progress' }, this.progress, ' ', this.progressText, ' ', this.stopButton, ' ', this.startButton, ' ', this.downloadButton),
      el('h3', null, 'Majorities'),
      this.majorities,
      el('h3', null, 'Seats in the runs'),
      this.histograms,
      el('h3', null, 'Most often the tipping point'),
      this.tipping,
      el('h3', null, 'Nationwide shares (middle 90% of runs)'),
      this.shares,
    );
  }

  setDataset(info) {
    this.info = info;
    replaceChildren(this.majorities);
    replaceChildren(this.histograms);
    replaceChildren(this.tipping);
    replaceChildren(this.shares);
    this.downloadButton.disabled = true;
  }

  /** Show the scenario's assumptions (engine.scenario()). */
  syncAssumptions(scenario) {
    for (const { input, says, a } of this.inputs.values()) {
      let v = scenario[a.key];
      if (a.key === 'runs') v = v ?? DEFAULT_RUNS;
      if (v === null || v === undefined) v = a.fallback;
      if (document.activeElement !== input && Number(input.value) !== v) input.value = String(v);
      setTextIfChanged(says, a.sentence(v));
    }
  }

  /** 'idle' | 'running' | 'done', with runs done of runs asked. */
  setProgress(state, done, asked) {
    this.progress.max = Math.max(1, asked);
    this.progress.value = done;
    const text =
      asked === 0
        ? 'No runs asked (runs = 0).'
        : state === 'running'
          ? `${fmtInt(done)} of ${fmtInt(asked)} runs`
          : state === 'done'
            ? `${fmtInt(done)} of ${fmtInt(asked)} runs: done`
            : `${fmtInt(done)} of ${fmtInt(asked)} runs (stopped)`;
    setTextIfChanged(this.progressText, text);
    this.stopButton.disabled = state !== 'running';
    this.downloadButton.disabled = done === 0;
  }

  /** Results so far (results.view()). */
  render(view) {
    const info = this.info;
    if (!info || !view) return;
    setTextIfChanged(this.caution, `${view.caution} ${info.caution}`);
    const n = view.runs_done;
    replaceChildren(
      this.majorities,
      view.parties.map((p, k) =>
        el('li', null, `${info.parties[k].name} has a majority ${p.majority_words}`, ` (${fmtInt(p.majority_runs)} of ${fmtInt(n)}).`),
      ),
      el('li', null, `No party has a majority ${view.no_majority_words} (${fmtInt(view.no_majority_runs)} of ${fmtInt(n)}).`),
    );
    replaceChildren(
      this.histograms,
      view.parties
        .map((p, k) => ({ p, k }))
        .filter(({ p }) => p.seats.p95 > 0)
        .map(({ p, k }) =>
          el(
            'figure',
            { class: 'sim-histogram' },
            histogram(info.parties[k], p.seats, info.majority, view),
            el(
              'figcaption',
              null,
              `${info.parties[k].name}: ${fmtInt(p.seats.p05)} to ${fmtInt(p.seats.p95)} seats in the middle 90% of runs (average ${fmt1(p.seats.mean)}).`,
            ),
          ),
        ),
    );
    replaceChildren(
      this.tipping,
      view.tipping.length
        ? view.tipping.map((t) => el('li', null, `${info.districts[t.district].name}: the tipping point ${t.words} (${fmtInt(t.runs)})`))
        : el('li', null, 'No district was the tipping point in these runs.'),
    );
    replaceChildren(
      this.shares,
      view.parties.map((p, k) =>
        el('li', null, `${info.parties[k].name}: ${fmt1(p.share.p05)}% to ${fmt1(p.share.p95)}% (half the runs under ${fmt1(p.share.p50)}%)`),
      ),
    );
  }
}
