// The results table: one row per district, sortable by any column (header buttons with
// aria-sort), and the CSV export, which is the engine's tallyCsv() unchanged.
import { el, replaceChildren, setTextIfChanged, fmtInt, fmt1 } from './dom.js';

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

export class ResultsTable {
  /**
   * The table is refreshed only while it is on screen (or about to be): a big dataset's
   * thousands of rows cost nothing while the sliders move and the table is out of view.
   * table.dataset.fresh says whether the rows show the current scenario.
   *
   * The rows are filled once as soon as a dataset is in (off screen too): an empty table
   * that fills the moment it scrolls into view widens its columns under the pointer, so
   * a click that began on one header button could end on another and sort nothing.
   */
  constructor(table) {
    this.table = table;
    this.sort = null; // {col, dir: 1|-1}
    this.rows = [];
    this.dirty = false;
    this.filled = false;
    this.visible = false;
    this.table.dataset.fresh = 'false';
    const observer = new IntersectionObserver(
      (entries) => {
        this.visible = entries.some((e) => e.isIntersecting);
        if (this.visible && this.dirty) this.refresh();
      },
      { rootMargin: '200px' },
    );
    observer.observe(table.closest('.table-wrap') ?? table);
  }

  /** The scenario changed: refresh now if on screen, else when it comes into view. */
  invalidate() {
    this.dirty = true;
    this.table.dataset.fresh = 'false';
    if (this.visible || !this.filled) this.refresh();
  }

  setDataset(engine, info) {
    this.engine = engine;
    this.info = info;
    this.sort = null;
    this.dirty = true;
    this.filled = false;
    this.table.dataset.fresh = 'false';
    const hasRegion = info.districts.some((d) => d.region);
    this.columns = [
      { key: 'name', label: 'District', type: 'text', rowHeader: true },
      hasRegion ? { key: 'region', label: 'Region', type: 'text' } : null,
      { key: 'seats', label: 'Seats', type: 'num' },
      { key: 'winner', label: 'Winner', type: 'text' },
      { key: 'margin', label: 'Margin (points)', type: 'num' },
      { key: 'turnout', label: 'Turnout (%)', type: 'num' },
      ...info.parties.map((p, k) => ({ key: `votes_${p.id}`, party: k, label: `Votes: ${p.name}`, type: 'num' })),
    ].filter(Boolean);

    this.headers = this.columns.map((c, col) => {
      const button = el('button', { type: 'button', class: 'sort', onclick: () => this.sortBy(col) }, c.label);
      return el('th', { scope: 'col', class: c.type === 'num' ? 'num' : null, dataset: { key: c.key } }, button);
    });
    this.body = el('tbody');
    this.rows = info.districts.map((d, i) => {
      const cells = this.columns.map((c) =>
        c.rowHeader ? el('th', { scope: 'row' }, d.name) : el('td', { class: c.type === 'num' ? 'num' : null, dataset: { key: c.key } }),
      );
      const tr = el('tr', { dataset: { i: String(i), district: d.id } }, cells);
      this.body.append(tr);
      return { tr, cells, values: {} };
    });
    replaceChildren(
      this.table,
      el('caption', null, 'Results by district for the scenario on screen (a scenario, not a forecast)'),
      el('thead', null, el('tr', null, this.headers)),
      this.body,
    );
  }

  /** Refresh every row from the engine. */
  refresh() {
    const { engine, info } = this;
    if (!engine) return;
    this.dirty = false;
    this.filled = true;
    const parties = info.parties;
    this.rows.forEach((row, i) => {
      const d = engine.district(i);
      const winnerId = d.winner < 0 ? 'tie' : parties[d.winner].id;
      const winnerName = d.winner < 0 ? 'Tie' : parties[d.winner].name;
      const changed = d.start_winner !== d.winner;
      row.values = {
        name: d.name,
        region: d.region ?? '',
        seats: d.seats,
        winner: winnerName,
        margin: d.margin,
        turnout: d.turnout,
      };
      parties.forEach((p, k) => {
        row.values[`votes_${p.id}`] = d.votes[k];
      });
      row.tr.dataset.winner = winnerId;
      row.tr.classList.toggle('changed', changed);
      this.columns.forEach((c, col) => {
        if (c.rowHeader) return;
        const cell = row.cells[col];
        const v = row.values[c.key];
        let text;
        if (c.key === 'winner') {
          text = changed ? `${winnerName} (gain)` : winnerName;
          cell.dataset.party = winnerId;
        } else if (c.key === 'seats') text = fmtInt(v);
        else if (c.key === 'margin' || c.key === 'turnout') text = fmt1(v);
        else if (c.type === 'num') text = fmtInt(v);
        else text = v;
        setTextIfChanged(cell, text);
      });
    });
    if (this.sort) this.applySort();
    this.table.dataset.fresh = 'true';
  }

  sortBy(col) {
    if (this.dirty) this.refresh();
    const dir = this.sort && this.sort.col === col ? -this.sort.dir : this.columns[col].type === 'num' ? -1 : 1;
    this.sort = { col, dir };
    this.applySort();
  }

  applySort() {
    const { col, dir } = this.sort;
    const c = this.columns[col];
    const order = this.rows.map((_, i) => i);
    order.sort((a, b) => {
      const va = this.rows[a].values[c.key];
      const vb = this.rows[b].values[c.key];
      const r = c.type === 'num' ? va - vb : collator.compare(String(va), String(vb));
      return r * dir || a - b;
    });
    this.headers.forEach((th, j) => {
      if (j === col) th.setAttribute('aria-sort', dir > 0 ? 'ascending' : 'descending');
      else th.removeAttribute('aria-sort');
    });
    const fragment = document.createDocumentFragment();
    for (const i of order) fragment.append(this.rows[i].tr);
    this.body.append(fragment);
  }
}

/** Offer the engine's CSV for download, unchanged. */
export function downloadCsv(csvText, fileName = 'stratamap-tally.csv') {
  const blob = new Blob([csvText], { type: 'text/csv;charset=utf-8' });
  const url = URL.createObjectURL(blob);
  const a = el('a', { href: url, download: fileName, class: 'visually-hidden' });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
