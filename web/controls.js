// The scenario controls: starting point, presets, reset, and for "all groups" and each
// group a turnout-shift and a margin-shift slider with the group's share of the electorate.
// The sliders call the engine's setters; the engine does all the arithmetic.
import { el, replaceChildren, setTextIfChanged, fmtPct, fmtSigned, fmt1 } from './dom.js';

const UI_RANGE = 20; // points either way; a link may ask for more, then the slider widens
const UI_STEP = '0.5';

const shiftFmt = new Intl.NumberFormat('en', { minimumFractionDigits: 1, maximumFractionDigits: 2 });

/** "+2.5" / "−1.25" / "0.0" for a slider value. */
export function fmtShift(v) {
  if (v === 0) return shiftFmt.format(0);
  return (v > 0 ? '+' : '\u2212') + shiftFmt.format(Math.abs(v));
}

export class Controls {
  /**
   * container: the controls section's body. handlers: {onChange(), onPreset(preset), onReset()}.
   */
  constructor(container, handlers) {
    this.container = container;
    this.handlers = handlers;
    this.sliders = []; // {kind: 'turnout'|'margin', group: -1..G-1, input, output}
    this.weightNodes = [];
  }

  setDataset(engine, info) {
    this.engine = engine;
    this.info = info;
    this.sliders = [];
    this.weightNodes = [];
    const A = info.parties[info.axis[0]].name;
    const B = info.parties[info.axis[1]].name;

    const start = el(
      'fieldset',
      { class: 'start' },
      el('legend', null, 'Starting point'),
      this.radio('poll', 'The current poll', !info.has_poll),
      this.radio('baseline', 'The baseline (the electorate file as it is)', false),
      info.has_poll ? null : el('p', { class: 'note' }, 'This dataset has no poll.'),
    );

    const presets = info.presets.length
      ? el(
          'div',
          { class: 'presets', role: 'group', 'aria-labelledby': 'presets-label' },
          el('span', { id: 'presets-label', class: 'presets-label' }, 'Presets'),
          info.presets.map((p) =>
            el(
              'button',
              { type: 'button', class: 'preset', onclick: () => this.handlers.onPreset(p) },
              p.name,
            ),
          ),
        )
      : null;

    const actions = el(
      'div',
      { class: 'actions' },
      el('button', { type: 'button', id: 'reset', onclick: () => this.handlers.onReset() }, 'Reset all sliders'),
    );

    const rows = [this.groupRow(-1, 'All groups', null, A, B)];
    info.groups.forEach((g, j) => rows.push(this.groupRow(j, g.name, g.poll, A, B)));

    replaceChildren(
      this.container,
      start,
      presets,
      actions,
      el(
        'p',
        { class: 'note axis-note' },
        `Margin sliders move votes between ${A} and ${B}; points to the right favour ${A}. ` +
          'The "all groups" sliders add to each group\'s own.',
      ),
      el('div', { class: 'groups' }, rows),
    );
  }

  radio(value, label, disabled) {
    const id = `start-${value}`;
    return el(
      'div',
      { class: 'radio' },
      el('input', {
        type: 'radio',
        name: 'start',
        id,
        value,
        disabled,
        onchange: (event) => {
          if (!event.target.checked) return;
          this.engine.setStart(value === 'poll');
          this.handlers.onChange();
        },
      }),
      el('label', { for: id }, label),
    );
  }

  groupRow(j, name, poll, A, B) {
    const key = j < 0 ? 'all' : String(j);
    const headingId = `group-${key}-name`;
    const weight = el('span', { class: 'weight' });
    this.weightNodes[j + 1] = weight;
    return el(
      'div',
      { class: j < 0 ? 'group group-all' : 'group', role: 'group', 'aria-labelledby': headingId, dataset: { group: key } },
      el(
        'div',
        { class: 'group-head' },
        el('h3', { id: headingId }, name),
        weight,
        poll && poll.margin_moe !== null && poll.margin_moe !== undefined
          ? el(
              'span',
              { class: 'poll-moe' },
              `poll: ${Math.round(poll.sample_size)} asked, margin \u00b1${fmt1(poll.margin_moe)} pts (95%)`,
            )
          : null,
      ),
      this.slider('turnout', j, key, name, 'Turnout shift', null, null),
      // The ends are named once, on the all-groups slider; every label says "toward A".
      this.slider('margin', j, key, name, `Margin shift toward ${A}`, j < 0 ? B : null, A),
    );
  }

  slider(kind, j, key, groupName, label, leftEnd, rightEnd) {
    const id = `${kind}-${key}`;
    const input = el('input', {
      type: 'range',
      id,
      min: -UI_RANGE,
      max: UI_RANGE,
      step: UI_STEP,
      value: 0,
      dataset: { kind, group: key },
    });
    const output = el('output', { for: id, id: `${id}-value` }, fmtShift(0));
    const entry = { kind, group: j, input, output, value: 0, groupName };
    this.sliders.push(entry);
    input.addEventListener('input', () => {
      const v = Number(input.value);
      entry.value = v;
      if (kind === 'turnout') this.engine.setTurnout(j, v);
      else this.engine.setMargin(j, v);
      this.showValue(entry);
      this.handlers.onChange();
    });
    return el(
      'div',
      { class: `slider slider-${kind}` },
      el('label', { for: id }, label, el('span', { class: 'visually-hidden' }, `, ${groupName}, in points`)),
      el(
        'div',
        { class: 'slider-track' },
        input,
        output,
      ),
      leftEnd === null
        ? null
        : el(
            'div',
            { class: 'slider-ends', 'aria-hidden': 'true' },
            el('span', null, `\u2190 ${leftEnd}`),
            el('span', null, `${rightEnd} \u2192`),
          ),
    );
  }

  showValue(entry) {
    const { input, output, value, kind } = entry;
    setTextIfChanged(output, fmtShift(value));
    let text;
    if (kind === 'turnout') {
      text = `${fmtShift(value)} points of turnout`;
    } else {
      const A = this.info.parties[this.info.axis[0]].name;
      const B = this.info.parties[this.info.axis[1]].name;
      text = value === 0 ? 'no shift' : `${fmtShift(Math.abs(value)).replace('+', '')} points toward ${value > 0 ? A : B}`;
    }
    input.setAttribute('aria-valuetext', text);
    output.classList.toggle('is-off-scale', Math.abs(value) > UI_RANGE);
  }

  /** Put a value on a slider without firing its events; widen the slider if needed. */
  setSlider(entry, value) {
    const { input } = entry;
    const reach = Math.max(UI_RANGE, Math.min(100, Math.ceil(Math.abs(value))));
    input.min = String(-reach);
    input.max = String(reach);
    input.step = Number.isInteger(value * 2) ? UI_STEP : 'any';
    input.value = String(value);
    entry.value = value;
    this.showValue(entry);
  }

  /** Show the engine's scenario on the controls (after a link, preset or reset). */
  sync(scenario) {
    for (const entry of this.sliders) {
      let v;
      if (entry.kind === 'turnout') v = entry.group < 0 ? scenario.turnout_all : scenario.turnout[entry.group];
      else v = entry.group < 0 ? scenario.margin_all : scenario.margin[entry.group];
      this.setSlider(entry, v ?? 0);
    }
    const poll = this.container.querySelector('#start-poll');
    const base = this.container.querySelector('#start-baseline');
    if (poll && base) {
      poll.checked = scenario.start === 'poll';
      base.checked = scenario.start !== 'poll';
    }
  }

  /** Each group's share of the electorate and its change vs the baseline. */
  showWeights(summary) {
    setTextIfChanged(this.weightNodes[0], `turnout ${fmtPct(summary.turnout)}`);
    summary.weights.forEach((w, j) => {
      const node = this.weightNodes[j + 1];
      if (!node) return;
      const delta = w - summary.base_weights[j];
      setTextIfChanged(node, `${fmtPct(w)} of voters (${fmtSigned(delta)} vs baseline)`);
    });
  }
}
