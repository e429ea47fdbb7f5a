// The details panel for one district: winner, margin, turnout, seats, votes per party,
// and what each group contributed (a small table: votes for the winner and the runner-up).
import { el, replaceChildren, fmtInt, fmt1, fmtPct, plural } from './dom.js';

export class DetailsPanel {
  constructor(container) {
    this.container = container;
    this.engine = null;
    this.info = null;
    this.index = null;
  }

  setDataset(engine, info) {
    this.engine = engine;
    this.info = info;
    this.show(null);
  }

  /** Show district i (or the hint when null). */
  show(i) {
    this.index = i;
    this.refresh();
  }

  /** Redraw for the current scenario. */
  refresh() {
    const { container, engine, info } = this;
    if (!engine || this.index === null || this.index === undefined) {
      replaceChildren(
        container,
        el('p', { class: 'hint' }, 'Point at, tap or tab to a district to see its numbers.'),
      );
      container.dataset.district = '';
      return;
    }
    const d = engine.district(this.index);
    const parties = info.parties;
    const name = (k) => (k < 0 ? 'Tie' : parties[k].name);
    container.dataset.district = d.id;

    const facts = el(
      'dl',
      { class: 'facts' },
      el('dt', null, 'Winner'),
      el('dd', { dataset: { party: d.winner < 0 ? 'tie' : parties[d.winner].id } }, name(d.winner)),
      el('dt', null, 'Margin'),
      el(
        'dd',
        null,
        d.winner < 0
          ? 'tied'
          : `${fmt1(d.margin)} points over ${d.runner_up >= 0 ? name(d.runner_up) : 'nobody'}`,
      ),
      d.moe !== null && d.moe !== undefined
        ? [el('dt', null, 'Margin of error'), el('dd', null, `\u00b1${fmt1(d.moe)} points (95%)`)]
        : null,
      el('dt', null, 'Turnout'),
      el('dd', null, `${fmtPct(d.turnout)} (${fmtInt(d.cast)} votes cast)`),
      el('dt', null, 'Seats'),
      el('dd', null, plural(d.seats, 'seat', 'seats')),
      d.start_winner !== d.winner
        ? [el('dt', null, 'At the starting point'), el('dd', null, name(d.start_winner))]
        : null,
    );

    const votes = el(
      'table',
      { class: 'mini' },
      el('caption', null, 'Votes'),
      el('thead', null, el('tr', null, el('th', { scope: 'col' }, 'Party'), el('th', { scope: 'col' }, 'Votes'), el('th', { scope: 'col' }, 'Share'))),
      el(
        'tbody',
        null,
        parties.map((p, k) =>
          el(
            'tr',
            null,
            el('th', { scope: 'row' }, p.name),
            el('td', null, fmtInt(d.votes[k])),
            el('td', null, d.cast > 0 ? fmtPct((100 * d.votes[k]) / d.cast) : '\u2013'),
          ),
        ),
      ),
    );

    // Contributions of each group to the two leading parties.
    // In a tie, the two parties with the most votes.
    const top =
      d.winner >= 0
        ? [d.winner, d.runner_up].filter((k) => k >= 0)
        : parties
            .map((_, k) => k)
            .sort((a, b) => d.votes[b] - d.votes[a])
            .slice(0, 2);
    const groups = el(
      'table',
      { class: 'mini' },
      el('caption', null, 'What each group contributed'),
      el(
        'thead',
        null,
        el(
          'tr',
          null,
          el('th', { scope: 'col' }, 'Group'),
          el('th', { scope: 'col' }, 'Turnout'),
          top.map((k) => el('th', { scope: 'col' }, parties[k].name)),
        ),
      ),
      el(
        'tbody',
        null,
        d.groups.map((g, j) =>
          g.cast > 0 || g.turnout > 0
            ? el(
                'tr',
                null,
                el('th', { scope: 'row' }, info.groups[j].name),
                el('td', null, fmtPct(g.turnout)),
                top.map((k) => el('td', null, fmtInt(g.votes[k]))),
              )
            : null,
        ),
      ),
    );

    replaceChildren(
      container,
      el('h3', null, d.name),
      d.region ? el('p', { class: 'region' }, d.region) : null,
      facts,
      votes,
      groups,
    );
  }
}
