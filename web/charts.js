// Charts drawn from the engine's numbers: the seats–votes curve and the shift plane.
// Inline SVG built node by node; names are text nodes.
import { el, svgEl, replaceChildren, fmtSigned, fmtInt } from './dom.js';

const W = 340;
const H = 210;
const PAD = { left: 40, right: 12, top: 12, bottom: 34 };

function scale(d0, d1, r0, r1) {
  const k = d1 === d0 ? 0 : (r1 - r0) / (d1 - d0);
  return (v) => r0 + (v - d0) * k;
}

function polyline(xs, ys, sx, sy) {
  return xs.map((x, i) => `${sx(x).toFixed(1)},${sy(ys[i]).toFixed(1)}`).join(' ');
}

/** Seats of A and B as the uniform extra margin shift toward A runs over its range. */
export function renderCurve(container, curve, info) {
  const A = info.parties[info.axis[0]];
  const B = info.parties[info.axis[1]];
  const xs = curve.shifts;
  const total = info.total_seats;
  const sx = scale(xs[0], xs[xs.length - 1], PAD.left, W - PAD.right);
  const sy = scale(0, total, H - PAD.bottom, PAD.top);

  const ticks = [];
  const step = xs[xs.length - 1] - xs[0] > 20 ? 5 : 2;
  for (let t = Math.ceil(xs[0] / step) * step; t <= xs[xs.length - 1] + 1e-9; t += step) {
    ticks.push(
      svgEl('line', { class: 'tick', x1: sx(t), x2: sx(t), y1: H - PAD.bottom, y2: H - PAD.bottom + 4 }),
      svgEl('text', { class: 'tick-label', x: sx(t), y: H - PAD.bottom + 15, 'text-anchor': 'middle' }, fmtSigned(t).replace('.0', '')),
    );
  }
  const yTicks = [0, info.majority, total].map((v) =>
    svgEl('text', { class: 'tick-label', x: PAD.left - 5, y: sy(v) + 3, 'text-anchor': 'end' }, fmtInt(v)),
  );
  const line = (ys, party, cls) =>
    svgEl('polyline', {
      class: `curve ${cls}`,
      points: polyline(xs, ys, sx, sy),
      stroke: party.color,
      fill: 'none',
    });

  const svg = svgEl(
    'svg',
    {
      class: 'chart',
      viewBox: `0 0 ${W} ${H}`,
      role: 'img',
      'aria-label': `Seats of ${A.name} and ${B.name} as the margin shifts; details in the text below`,
    },
    svgEl('rect', { class: 'plot-bg', x: PAD.left, y: PAD.top, width: W - PAD.left - PAD.right, height: H - PAD.top - PAD.bottom }),
    svgEl('line', { class: 'majority', x1: PAD.left, x2: W - PAD.right, y1: sy(info.majority), y2: sy(info.majority) }),
    svgEl('line', { class: 'now', x1: sx(0), x2: sx(0), y1: PAD.top, y2: H - PAD.bottom }),
    ticks,
    yTicks,
    line(curve.seats_b, B, 'curve-b'),
    line(curve.seats_a, A, 'curve-a'),
    svgEl('text', { class: 'axis-label', x: (PAD.left + W - PAD.right) / 2, y: H - 4, 'text-anchor': 'middle' }, `extra shift, points toward ${A.name}`),
  );

  // a_majority_at: the smallest shift at which A holds a majority; b_majority_at: the
  // largest at which B does (shifts in points toward A).
  const pts = (v) => `${fmtSigned(Math.abs(v)).replace('+', '')} points`;
  const swingA = (at) => {
    if (at === null || at === undefined) return `${A.name}: no majority within reach.`;
    return at > 0
      ? `${A.name} reaches a majority with a shift of ${pts(at)} toward it.`
      : `${A.name} has a majority; it keeps it unless the shift toward ${B.name} exceeds ${pts(at)}.`;
  };
  const swingB = (at) => {
    if (at === null || at === undefined) return `${B.name}: no majority within reach.`;
    return at < 0
      ? `${B.name} reaches a majority with a shift of ${pts(at)} toward it.`
      : `${B.name} has a majority; it keeps it unless the shift toward ${A.name} exceeds ${pts(at)}.`;
  };

  const key = el(
    'ul',
    { class: 'chart-key' },
    [A, B].map((p) => {
      const mark = el('span', { class: 'key-line', 'aria-hidden': 'true' });
      mark.style.backgroundColor = p.color;
      return el('li', null, mark, p.name);
    }),
    el('li', null, el('span', { class: 'key-line key-majority', 'aria-hidden': 'true' }), 'majority'),
  );

  replaceChildren(
    container,
    svg,
    key,
    el(
      'ul',
      { class: 'swing', id: 'swing' },
      el('li', { dataset: { party: A.id, at: String(curve.a_majority_at) } }, swingA(curve.a_majority_at)),
      el('li', { dataset: { party: B.id, at: String(curve.b_majority_at) } }, swingB(curve.b_majority_at)),
    ),
    el('p', { class: 'note' }, 'Shift 0 is the scenario on screen; the extra shift is added to every group.'),
  );
}

/** Each group's weight change (x) and A−B margin change (y) vs the baseline. */
export function renderPlane(container, points, info) {
  const A = info.parties[info.axis[0]];
  const B = info.parties[info.axis[1]];
  const size = 240;
  const pad = 28;
  const reach = (vals) => Math.max(1, ...vals.map((v) => Math.abs(v))) * 1.15;
  const rx = reach(points.map((p) => p.x));
  const ry = reach(points.map((p) => p.y));
  const sx = scale(-rx, rx, pad, size - pad);
  const sy = scale(-ry, ry, size - pad, pad);
  const dots = points.map((p, j) =>
    svgEl(
      'g',
      { class: 'dot' },
      svgEl('circle', { cx: sx(p.x), cy: sy(p.y), r: 4 }),
      svgEl('text', { x: sx(p.x) + 5, y: sy(p.y) - 4, class: 'dot-label' }, String(j + 1)),
      svgEl('title', null, `${info.groups[j].name}: weight ${fmtSigned(p.x)}, margin ${fmtSigned(p.y)}`),
    ),
  );
  const svg = svgEl(
    'svg',
    { class: 'chart plane', viewBox: `0 0 ${size} ${size}`, role: 'img', 'aria-label': 'Shift plane: each group by weight change and margin change' },
    svgEl('rect', { class: 'plot-bg', x: pad, y: pad, width: size - 2 * pad, height: size - 2 * pad }),
    svgEl('line', { class: 'axis', x1: pad, x2: size - pad, y1: sy(0), y2: sy(0) }),
    svgEl('line', { class: 'axis', x1: sx(0), x2: sx(0), y1: pad, y2: size - pad }),
    svgEl('text', { class: 'tick-label', x: size / 2, y: 14, 'text-anchor': 'middle' }, `toward ${A.name} \u2191`),
    svgEl('text', { class: 'tick-label', x: size / 2, y: size - 6, 'text-anchor': 'middle' }, `toward ${B.name} \u2193`),
    svgEl('text', { class: 'tick-label', x: size - pad, y: sy(0) - 4, 'text-anchor': 'end' }, 'weight \u2192'),
    dots,
  );
  const table = el(
    'table',
    { class: 'mini' },
    el('caption', { class: 'visually-hidden' }, 'Shift plane values'),
    el('thead', null, el('tr', null, el('th', { scope: 'col' }, 'Group'), el('th', { scope: 'col' }, 'Weight change'), el('th', { scope: 'col' }, `Margin change toward ${A.name}`))),
    el(
      'tbody',
      null,
      points.map((p, j) => el('tr', null, el('th', { scope: 'row' }, `${j + 1}. ${info.groups[j].name}`), el('td', { class: 'num' }, fmtSigned(p.x)), el('td', { class: 'num' }, fmtSigned(p.y)))),
    ),
  );
  const details = el('details', { class: 'plane-values' }, el('summary', null, 'Groups and values (the numbers on the points)'), table);
  replaceChildren(container, svg, details);
}
