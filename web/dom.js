// Small DOM and formatting helpers. Everything that comes from a dataset or a link is
// put into the page as text (textContent / text nodes), never parsed as markup.

const SVG_NS = 'http://www.w3.org/2000/svg';

function apply(node, props) {
  for (const [key, value] of Object.entries(props ?? {})) {
    if (value === undefined || value === null || value === false) continue;
    if (key === 'class') node.setAttribute('class', value);
    else if (key === 'text') node.textContent = String(value);
    else if (key === 'dataset') Object.assign(node.dataset, value);
    else if (key.startsWith('on') && typeof value === 'function') {
      node.addEventListener(key.slice(2), value);
    } else if (value === true) node.setAttribute(key, '');
    else node.setAttribute(key, String(value));
  }
  return node;
}

function append(node, children) {
  for (const child of children.flat(Infinity)) {
    if (child === undefined || child === null || child === false) continue;
    node.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return node;
}

/** Create an HTML element: el('p', {class: 'x'}, 'text', otherNode). Strings become text. */
export function el(tag, props, ...children) {
  return append(apply(document.createElement(tag), props), children);
}

/** Create an SVG element in the SVG namespace. */
export function svgEl(tag, props, ...children) {
  return append(apply(document.createElementNS(SVG_NS, tag), props), children);
}

/** Replace all children of node with the given children. */
export function replaceChildren(node, ...children) {
  node.replaceChildren();
  return append(node, children);
}

/** Set an attribute only when its value differs (saves style recalculation on big maps). */
export function setAttrIfChanged(node, name, value) {
  if (node.getAttribute(name) !== value) node.setAttribute(name, value);
}

/** Set textContent only when it differs. */
export function setTextIfChanged(node, text) {
  if (node.textContent !== text) node.textContent = text;
}

export function byId(id) {
  const node = document.getElementById(id);
  if (!node) throw new Error(`page is missing #${id}`);
  return node;
}

/** Run fn at most once per `ms` of quiet: the last call wins. */
export function debounce(fn, ms) {
  let timer = null;
  const wrapped = (...args) => {
    if (timer !== null) clearTimeout(timer);
    timer = setTimeout(() => {
      timer = null;
      fn(...args);
    }, ms);
  };
  return wrapped;
}

const intFmt = new Intl.NumberFormat('en', { maximumFractionDigits: 0 });
const oneFmt = new Intl.NumberFormat('en', { minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** 12,345 */
export function fmtInt(n) {
  return intFmt.format(n);
}

/** 12.3 */
export function fmt1(n) {
  return oneFmt.format(n);
}

/** +1.5 / −1.5 / 0.0, with a real minus sign. */
export function fmtSigned(n) {
  if (Object.is(n, -0) || Math.abs(n) < 0.05) return oneFmt.format(0);
  return (n > 0 ? '+' : '\u2212') + oneFmt.format(Math.abs(n));
}

/** 41.2% */
export function fmtPct(n) {
  return `${oneFmt.format(n)}%`;
}

/** "1 seat" / "3 seats" */
export function plural(n, one, many) {
  return `${fmtInt(n)} ${n === 1 ? one : many}`;
}
