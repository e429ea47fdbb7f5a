// Downloads that carry their caution: the map as SVG and as PNG (drawn from the same
// SVG at twice the screen's resolution), the results as CSV with its CSV on the Web
// metadata beside it, and the scenario as JSON. The engine writes every file's content
// (title, legend, seats against the majority, the scenario in sentences, source,
// caution); this module only names the files and hands them to the browser.
import { el } from './dom.js';

export const FILES = {
  svg: 'stratamap-map.svg',
  png: 'stratamap-map.png',
  csv: 'stratamap-tally.csv',
  csvw: 'stratamap-tally.csv-metadata.json',
  json: 'stratamap-scenario.json',
};

/** Hand a Blob to the browser as a download named fileName. */
export function downloadBlob(blob, fileName) {
  const url = URL.createObjectURL(blob);
  const a = el('a', { href: url, download: fileName, class: 'visually-hidden' });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadText(text, type, fileName) {
  downloadBlob(new Blob([text], { type }), fileName);
}

/** The SVG document's size in CSS pixels, from its width and height attributes. */
function svgSize(svgText) {
  const doc = new DOMParser().parseFromString(svgText, 'image/svg+xml');
  const root = doc.documentElement;
  const vb = (root.getAttribute('viewBox') ?? '').split(/[\s,]+/).map(Number);
  const width = Number.parseFloat(root.getAttribute('width')) || vb[2] || 800;
  const height = Number.parseFloat(root.getAttribute('height')) || vb[3] || 600;
  return { width, height };
}

/** The PNG scale: twice the screen's resolution (at least 2 device pixels a CSS pixel). */
export function pngScale() {
  return 2 * Math.max(1, window.devicePixelRatio || 1);
}

/** Draw an SVG document on a canvas at `scale` and resolve to a PNG Blob. */
export async function svgToPng(svgText, scale = pngScale()) {
  const { width, height } = svgSize(svgText);
  const img = new Image();
  img.decoding = 'sync';
  // A data: address keeps the canvas clean (no cross-origin taint) and needs no blob: in
  // the page's Content-Security-Policy.
  img.src = `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svgText)}`;
  await img.decode();
  const canvas = document.createElement('canvas');
  canvas.width = Math.round(width * scale);
  canvas.height = Math.round(height * scale);
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
  return new Promise((resolve, reject) => {
    canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the map could not be drawn as PNG'))), 'image/png');
  });
}

/**
 * The export buttons' work. `source` gives the engine's texts:
 * {renderSvg(), tallyCsv(), tallyCsvw(csvName), scenarioJson(link)}.
 */
export async function exportFile(kind, source, link) {
  switch (kind) {
    case 'svg':
      return downloadText(source.renderSvg(), 'image/svg+xml', FILES.svg);
    case 'png':
      return downloadBlob(await svgToPng(source.renderSvg()), FILES.png);
    case 'csv':
      return downloadText(source.tallyCsv(), 'text/csv;charset=utf-8', FILES.csv);
    case 'csvw':
      return downloadText(source.tallyCsvw(FILES.csv), 'application/csvm+json', FILES.csvw);
    case 'json':
      return downloadText(source.scenarioJson(link), 'application/json', FILES.json);
    default:
      throw new Error(`unknown export ${kind}`);
  }
}

/** The export controls: one button per file, with the caution beside them. */
export function exportControls(onExport) {
  const button = (kind, label, hint) =>
    el(
      'button',
      // The CSV button keeps its historical id, which scripts and tests use.
      { type: 'button', id: kind === 'csv' ? 'download-csv' : `export-${kind}`, 'data-export': kind, title: hint, onclick: () => onExport(kind) },
      label,
    );
  return el(
    'div',
    { class: 'exports', role: 'group', 'aria-labelledby': 'exports-heading' },
    el('h3', { id: 'exports-heading' }, 'Download'),
    el(
      'div',
      { class: 'export-buttons' },
      button('svg', 'Map (SVG)', 'The map with its title, legend, seats, the scenario in words, source and caution'),
      button('png', 'Map (PNG)', 'The same picture as an image, at twice the screen\u2019s resolution'),
      button('csv', 'Results (CSV)', 'One row per district, every number unrounded'),
      button('csvw', 'CSV metadata', 'W3C CSV on the Web metadata for the CSV: column types, title, source, scenario and caution'),
      button('json', 'Scenario (JSON)', 'Every value of the scenario, its link, title and source'),
    ),
    el('p', { class: 'caution export-caution caution-text' }, 'A scenario, not a forecast.'),
  );
}
