// The summary: seats against the majority line, nationwide shares, districts that changed
// hands, the tipping point, the margin of error, and clamp counts. The seats–votes curve
// and the shift plane live in charts.js (they are computed after the sliders settle).
import { byId, el, replaceChildren, setTextIfChanged, fmtInt, fmt1, fmtPct, plural } from './dom.js';

const CHANGED_LIST_MAX = 40;

export class SummaryPanel {
  setDataset(engine, info) {
    this.engine = engine;
    this.info = info;
    this.buildSeats();
    this.buildShares();
  }

  buildSeats() {
    const { info } = this;
    const total = info.total_seats;
    const majorityAt = `${(100 * info.majority) / total}%`;
    this.seatRows = info.parties.map((p) => {
      const bar = el('span', { class: 'bar-fill' });
      bar.style.backgroundColor = p.color;
      const count = el('span', { class: 'seat-count' });
      const row = el(
        'li',
        { class: 'seat-row', dataset: { party: p.id } },
        el('span', { class: 'seat-name' }, p.name),
        el('span', { class: 'bar', 'aria-hidden': 'true' }, bar),
        count,
      );
      return { row, bar, count };
    });
    const list = el('ul', { class: 'seat-list' }, this.seatRows.map((r) => r.row));
    // Each bar draws the majority mark at --majority-at (style.css).
    const barsWrap = el('div', { class: 'seat-bars' }, list);
    barsWrap.style.setProperty('--majority-at', majorityAt);
    this.headline = el('p', { class: 'headline', id: 'headline', 'aria-live': 'polite' });
    this.tiedLine = el('p', { class: 'note', id: 'tied-seats' });
    replaceChildren(
      byId('seats'),
      this.headline,
      barsWrap,
      el(
        'p',
        { class: 'note' },
        `The line marks a majority: ${plural(info.majority, 'seat', 'seats')} of ${fmtInt(total)}.`,
      ),
      this.tiedLine,
    );
  }

  buildShares() {
    this.shareRows = this.info.parties.map((p) => {
      const value = el('td', { class: 'num' });
      const moe = el('td', { class: 'num moe' });
      return {
        value,
        moe,
        row: el('tr', { dataset: { party: p.id } }, el('th', { scope: 'row' }, p.name), value, moe),
      };
    });
    replaceChildren(
      byId('shares'),
      el(
        'table',
        { class: 'mini' },
        el('caption', null, 'Nationwide vote shares'),
        el(
          'thead',
          null,
          el('tr', null, el('th', { scope: 'col' }, 'Party'), el('th', { scope: 'col' }, 'Share'), el('th', { scope: 'col' }, 'Margin of error (95%)')),
        ),
        el('tbody', null, this.shareRows.map((r) => r.row)),
      ),
      el('p', { class: 'note', id: 'turnout-total' }),
    );
  }

  /**
   * Update for a new scenario (called on every slider input; keep it light). winners and
   * margins are the engine's per-district arrays. The list of changes of hands is drawn
   * by renderChanged once the sliders settle; its count is drawn here.
   */
  render(summary, winners, margins) {
    const { info } = this;
    const total = info.total_seats;
    const parties = info.parties;

    summary.seats.forEach((s, k) => {
      const r = this.seatRows[k];
      r.bar.style.width = `${(100 * s) / total}%`;
      setTextIfChanged(r.count, fmtInt(s));
      r.row.dataset.seats = String(s);
    });
    const m = summary.majority_party;
    setTextIfChanged(
      this.headline,
      m === null || m === undefined
        ? `No party has a majority (${fmtInt(summary.majority)} of ${fmtInt(total)} seats needed).`
        : `${parties[m].name} has a majority: ${fmtInt(summary.seats[m])} of ${fmtInt(total)} seats.`,
    );
    setTextIfChanged(
      this.tiedLine,
      summary.tied_seats > 0 ? `Tied districts: ${plural(summary.tied_seats, 'seat', 'seats')} go to nobody.` : '',
    );

    summary.shares.forEach((s, k) => {
      const r = this.shareRows[k];
      setTextIfChanged(r.value, fmtPct(s));
      const moe = summary.shares_moe ? summary.shares_moe[k] : null;
      setTextIfChanged(r.moe, moe === null || moe === undefined ? '\u2013' : `\u00b1${fmt1(moe)}`);
    });
    setTextIfChanged(
      byId('turnout-total'),
      `Turnout: ${fmtPct(summary.turnout)} of those eligible.` +
        (summary.shares_moe ? '' : ' Margins of error apply only when starting from the poll.'),
    );

    // Tipping point.
    const tip = summary.tipping;
    const tipNode = byId('tipping');
    if (tip === null || tip === undefined) {
      setTextIfChanged(tipNode, 'No tipping-point district: no party can reach a majority.');
      tipNode.dataset.district = '';
    } else {
      const d = info.districts[tip];
      const w = winners[tip];
      const who = w < 0 ? 'tied' : `${parties[w].name} by ${fmt1(margins[tip])} points`;
      setTextIfChanged(tipNode, `Tipping point: ${d.name} (${who}), ringed on the map.`);
      tipNode.dataset.district = d.id;
    }

    // Within the margin of error.
    const w = summary.within_moe;
    setTextIfChanged(
      byId('within-moe'),
      w
        ? `Within the margin of error: ${plural(w.districts, 'district', 'districts')} (${plural(w.seats, 'seat', 'seats')}).`
        : '',
    );

    // Where a clamp or limit bit.
    const clamps = [];
    if (summary.turnout_clamped > 0) {
      clamps.push(`turnout reached 0% or 100% in ${plural(summary.turnout_clamped, 'cell', 'cells')}`);
    }
    if (summary.margin_limited > 0) {
      clamps.push(`a margin shift ran out of votes to move in ${plural(summary.margin_limited, 'cell', 'cells')}`);
    }
    setTextIfChanged(
      byId('clamps'),
      clamps.length ? `Limits reached (district \u00d7 group cells): ${clamps.join('; ')}.` : '',
    );

    this.renderChangedCount(summary.changed);
  }

  renderChangedCount(changed) {
    const count = byId('changed-count');
    count.dataset.count = String(changed.length);
    setTextIfChanged(
      count,
      changed.length
        ? `${plural(changed.length, 'district changes', 'districts change')} hands from the starting point.`
        : 'No district changes hands from the starting point.',
    );
  }

  /** The list of districts that changed hands (after the sliders settle). */
  renderChanged(changed) {
    const { engine, info } = this;
    const name = (k) => (k < 0 ? 'tie' : info.parties[k].name);
    this.renderChangedCount(changed);
    const items = changed.slice(0, CHANGED_LIST_MAX).map((i) => {
      const d = engine.district(i);
      return el('li', { dataset: { district: d.id } }, `${d.name}: ${name(d.start_winner)} \u2192 ${name(d.winner)}`);
    });
    if (changed.length > CHANGED_LIST_MAX) {
      items.push(el('li', { class: 'more' }, `and ${fmtInt(changed.length - CHANGED_LIST_MAX)} more (see the results table)`));
    }
    replaceChildren(byId('changed-list'), items);
  }
}
