// The district map: the engine's SVG, filled by the page on every update, with a
// highlight and the tipping-point ring in an overlay. Each district is focusable.
import { el, svgEl, setAttrIfChanged, replaceChildren } from './dom.js';

/**
 * Parse the engine's SVG as XML and keep only inert content. The engine escapes all
 * text already; this is a second line of defence, not the first.
 */
function parseSvg(text) {
  const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
  const root = doc.documentElement;
  if (root.nodeName !== 'svg' || doc.getElementsByTagName('parsererror').length) {
    throw new Error('The engine returned a map that is not valid SVG.');
  }
  for (const bad of root.querySelectorAll('script, foreignObject, iframe, object, embed')) {
    bad.remove();
  }
  for (const node of [root, ...root.querySelectorAll('*')]) {
    for (const attr of [...node.attributes]) {
      const name = attr.name.toLowerCase();
      const isLink = name === 'href' || name === 'xlink:href';
      if (name.startsWith('on') || (isLink && !attr.value.startsWith('#'))) {
        node.removeAttribute(attr.name);
      }
    }
  }
  return document.importNode(root, true);
}

export class DistrictMap {
  /**
   * container: element to hold the map. onInspect(i, {pinned}) is called with a district
   * index when one is hovered, focused or tapped, and with null when nothing is.
   */
  constructor(container, onInspect) {
    this.container = container;
    this.onInspect = onInspect;
    this.paths = [];
    this.lastWinner = [];
    this.pinned = null;
    this.hovered = null;
    this.info = null;
  }

  /** Insert a new dataset's map (replacing any earlier one). */
  mount(engine, info) {
    const svg = parseSvg(engine.mapSvg());
    this.info = info;
    this.anchors = engine.anchors();
    svg.setAttribute('role', 'group');
    svg.setAttribute('aria-label', `Map of ${info.districts.length} districts`);
    svg.removeAttribute('width');
    svg.removeAttribute('height');
    const vb = (svg.getAttribute('viewBox') ?? '0 0 100 100').split(/[\s,]+/).map(Number);
    this.size = Math.max(vb[2] || 100, vb[3] || 100);

    // Thinner edges when districts are many and small, so the fills stay readable.
    const n = info.districts.length;
    svg.style.setProperty('--edge-width', n > 1500 ? '0.25px' : n > 400 ? '0.5px' : '0.8px');
    // Many small shapes: skip anti-aliasing, which is most of the cost of a repaint.
    svg.classList.toggle('sm-dense', n > 1500);
    const paths = [...svg.querySelectorAll('path.sm-district')];
    if (paths.length !== info.districts.length) {
      throw new Error(
        `The engine's map has ${paths.length} districts, the dataset ${info.districts.length}.`,
      );
    }
    this.paths = [];
    for (const path of paths) {
      const i = Number(path.dataset.i);
      const d = info.districts[i];
      path.setAttribute('tabindex', '0');
      path.setAttribute('role', 'button');
      path.setAttribute('aria-label', d.name);
      path.dataset.id = d.id;
      this.paths[i] = path;
    }
    this.lastWinner = new Array(paths.length).fill(undefined);

    // The engine leaves an empty overlay group on top; use it (or add one).
    this.overlay = svg.querySelector('g.sm-overlay') ?? svgEl('g', { class: 'sm-overlay' });
    this.overlay.setAttribute('aria-hidden', 'true');
    this.highlight = svgEl('path', { class: 'sm-highlight', d: '' });
    this.ring = svgEl(
      'g',
      { class: 'sm-tipping', visibility: 'hidden' },
      svgEl('circle', { class: 'sm-tipping-halo', r: this.size * 0.022 }),
      svgEl('circle', { class: 'sm-tipping-ring', r: this.size * 0.022 }),
    );
    this.overlay.append(this.highlight, this.ring);
    svg.append(this.overlay); // (moves it last if it was not)

    this.pinned = null;
    this.hovered = null;
    this.svg = svg;
    this.listen(svg);
    replaceChildren(this.container, svg);
  }

  listen(svg) {
    const indexOf = (event) => {
      const path = event.target.closest?.('path.sm-district');
      return path ? Number(path.dataset.i) : null;
    };
    svg.addEventListener('pointerover', (event) => {
      const i = indexOf(event);
      if (i === null || event.pointerType === 'touch') return;
      this.hovered = i;
      this.show(i, false);
    });
    svg.addEventListener('pointerleave', () => {
      this.hovered = null;
      this.show(this.pinned, true);
    });
    svg.addEventListener('click', (event) => {
      const i = indexOf(event);
      this.pin(i);
    });
    svg.addEventListener('focusin', (event) => {
      const i = indexOf(event);
      if (i !== null) this.pin(i);
    });
    svg.addEventListener('keydown', (event) => {
      const i = indexOf(event);
      if (i === null) return;
      if (event.key === 'Enter' || event.key === ' ') {
        event.preventDefault();
        this.pin(i);
      } else if (event.key === 'Escape') {
        this.pin(null);
        event.target.blur();
      }
    });
  }

  pin(i) {
    this.pinned = i;
    this.show(i, true);
  }

  show(i, pinned) {
    const path = i === null ? null : this.paths[i];
    this.highlight.setAttribute('d', path ? path.getAttribute('d') : '');
    for (const p of this.svg.querySelectorAll('.is-pinned')) p.classList.remove('is-pinned');
    if (pinned && path) path.classList.add('is-pinned');
    this.onInspect(i, { pinned });
  }

  /** The district shown in the details panel now (hovered over pinned), or null. */
  current() {
    return this.hovered ?? this.pinned;
  }

  /** Repaint: fill of each district from palette[fills[i]]; only changed attributes are set. */
  paint(palette, fills, winners, tipping) {
    const parties = this.info.parties;
    const districts = this.info.districts;
    for (let i = 0; i < this.paths.length; i += 1) {
      const path = this.paths[i];
      setAttrIfChanged(path, 'fill', palette[fills[i]]);
      const w = winners[i];
      if (this.lastWinner[i] !== w) {
        this.lastWinner[i] = w;
        path.dataset.winner = w < 0 ? 'tie' : parties[w].id;
        const who = w < 0 ? 'tied' : parties[w].name;
        path.setAttribute('aria-label', `${districts[i].name}: ${who}`);
      }
    }
    if (tipping === null || tipping === undefined) {
      setAttrIfChanged(this.ring, 'visibility', 'hidden');
      delete this.svg.dataset.tipping;
    } else {
      const x = this.anchors[2 * tipping];
      const y = this.anchors[2 * tipping + 1];
      setAttrIfChanged(this.ring, 'transform', `translate(${x} ${y})`);
      setAttrIfChanged(this.ring, 'visibility', 'visible');
      this.svg.dataset.tipping = String(tipping);
    }
  }
}

/**
 * The legend: one row per party with its shading steps (near-even to safe), the tie
 * hatch, and the tipping-point ring.
 */
export function renderLegend(container, info, palette) {
  const steps = info.steps;
  const S = steps.length;
  const tieFill = palette[info.parties.length * S];
  const swatch = (fill, label, data) =>
    svgEl(
      'svg',
      { class: 'swatch', viewBox: '0 0 16 16', width: 16, height: 16, role: 'img', 'aria-label': label },
      svgEl('rect', { x: 0.5, y: 0.5, width: 15, height: 15, rx: 2, fill, dataset: data }),
    );

  const head = el(
    'tr',
    null,
    el('th', { scope: 'col' }, 'Party'),
    steps.map((s) => el('th', { scope: 'col' }, s.label)),
  );
  const rows = info.parties.map((p, k) =>
    el(
      'tr',
      { dataset: { party: p.id } },
      el('th', { scope: 'row' }, p.name),
      steps.map((s, j) =>
        el(
          'td',
          null,
          swatch(palette[k * S + j], `${p.name}, ${s.label}`, {
            party: p.id,
            step: String(j),
            fill: palette[k * S + j],
          }),
        ),
      ),
    ),
  );
  replaceChildren(
    container,
    el(
      'table',
      { class: 'legend-table' },
      el('caption', null, 'Winner and how safe the lead is'),
      el('thead', null, head),
      el('tbody', null, rows),
    ),
    el(
      'ul',
      { class: 'legend-extra' },
      el('li', null, swatch(tieFill, 'Tie', { party: 'tie', fill: tieFill }), ' Tie (seats go to nobody)'),
      el(
        'li',
        null,
        svgEl(
          'svg',
          { class: 'swatch', viewBox: '0 0 16 16', width: 16, height: 16, 'aria-hidden': 'true' },
          svgEl('circle', { class: 'legend-ring', cx: 8, cy: 8, r: 5.5 }),
        ),
        ' Tipping-point district',
      ),
    ),
  );
}
