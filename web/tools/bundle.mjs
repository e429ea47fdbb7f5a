// Writes the single-file page (called by web/bundle.sh; see there):
//
//   node web/tools/bundle.mjs DATASET OUT.html
//
// esbuild bundles the page's ES modules with the engine's WebAssembly inlined (binary
// loader) and the dataset's files as strings (a virtual module that replaces
// web/embedded.js); the style sheet is minified by esbuild too. The HTML is index.html
// with the script and the style inlined and a Content-Security-Policy that allows
// exactly those two by their SHA-256 hashes, and no network at all.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import * as esbuild from 'esbuild';

const here = path.dirname(fileURLToPath(import.meta.url));
const WEB = path.resolve(here, '..');

function fail(message) {
  process.stderr.write(`bundle.sh: ${message}\n`);
  process.exit(1);
}

const [datasetArg, outArg] = process.argv.slice(2);
if (!datasetArg || !outArg) {
  process.stderr.write('usage: bash web/bundle.sh DATASET OUT.html\n  DATASET: a dataset\'s manifest (dataset.json) or the folder that holds it\n');
  process.exit(2);
}

let manifestPath = path.resolve(datasetArg);
if (fs.existsSync(manifestPath) && fs.statSync(manifestPath).isDirectory()) {
  manifestPath = path.join(manifestPath, 'dataset.json');
}
if (!fs.existsSync(manifestPath)) fail(`${manifestPath}: no such manifest`);

const read = (file, what) => {
  try {
    return fs.readFileSync(file, 'utf8');
  } catch (e) {
    return fail(`cannot read ${what} ${file}: ${e.message}`);
  }
};
const manifest = read(manifestPath, 'the manifest');
let names;
try {
  // Only the file names are read here; the engine validates everything when the page opens.
  names = JSON.parse(manifest);
} catch (e) {
  fail(`${manifestPath} is not JSON: ${e.message}`);
}
for (const key of ['districts', 'electorate']) {
  if (typeof names[key] !== 'string') fail(`${manifestPath}: "${key}" must name a file`);
}
const dir = path.dirname(manifestPath);
const texts = {
  manifest,
  districts: read(path.resolve(dir, names.districts), 'the districts file'),
  electorate: read(path.resolve(dir, names.electorate), 'the electorate file'),
  poll: typeof names.poll === 'string' ? read(path.resolve(dir, names.poll), 'the poll file') : undefined,
};

const wasmFile = path.join(WEB, 'pkg', 'stratamap_bg.wasm');
if (!fs.existsSync(wasmFile)) fail('web/pkg is missing: run bash web/build.sh');

/** web/embedded.js (null on the normal site) becomes the inlined engine and dataset. */
const embedPlugin = {
  name: 'stratamap-embedded',
  setup(build) {
    build.onResolve({ filter: /(^|\/)embedded\.js$/ }, () => ({ path: 'embedded', namespace: 'stratamap' }));
    build.onLoad({ filter: /.*/, namespace: 'stratamap' }, () => ({
      contents:
        `import wasm from ${JSON.stringify(wasmFile)};\n` +
        `export default { wasm, texts: ${JSON.stringify(texts)}, name: ${JSON.stringify(path.basename(dir))} };\n`,
      loader: 'js',
      resolveDir: WEB,
    }));
  },
};

const js = await esbuild.build({
  entryPoints: [path.join(WEB, 'app.js')],
  bundle: true,
  format: 'esm',
  minify: true,
  write: false,
  legalComments: 'none',
  target: ['es2022'],
  loader: { '.wasm': 'binary' },
  plugins: [embedPlugin],
  logLevel: 'warning',
});
const css = await esbuild.build({
  entryPoints: [path.join(WEB, 'style.css')],
  bundle: true,
  minify: true,
  write: false,
  logLevel: 'warning',
});
const script = js.outputFiles[0].text.replace(/<\/script/gi, '<\\/script');
const style = css.outputFiles[0].text.replace(/<\/style/gi, '<\\/style');
const hash = (text) => `'sha256-${createHash('sha256').update(text, 'utf8').digest('base64')}'`;
const icon = `data:image/svg+xml;base64,${fs.readFileSync(path.join(WEB, 'icon.svg')).toString('base64')}`;

const csp = [
  "default-src 'none'",
  `script-src ${hash(script)} 'wasm-unsafe-eval'`,
  `style-src ${hash(style)}`,
  'img-src data: blob:',
  "connect-src 'none'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
].join('; ');

let html = read(path.join(WEB, 'index.html'), 'the page');
const swap = (pattern, replacement, what) => {
  if (!pattern.test(html)) fail(`web/index.html has no ${what} to replace`);
  html = html.replace(pattern, () => replacement);
};
swap(/<meta http-equiv="Content-Security-Policy"[^>]*>/, `<meta http-equiv="Content-Security-Policy" content="${csp}">`, 'Content-Security-Policy');
swap(/<link rel="icon"[^>]*>/, `<link rel="icon" href="${icon}" type="image/svg+xml">`, 'icon link');
swap(/<link rel="stylesheet"[^>]*>/, `<style>${style}</style>`, 'style sheet link');
swap(/<script type="module" src="[^"]*"><\/script>/, `<script type="module">${script}</script>`, 'module script');

fs.mkdirSync(path.dirname(path.resolve(outArg)), { recursive: true });
fs.writeFileSync(outArg, html);
const kib = (n) => `${(n / 1024).toFixed(0)} KiB`;
process.stderr.write(`bundle.sh: wrote ${outArg} (${kib(Buffer.byteLength(html))}: script ${kib(script.length)}, style ${kib(style.length)})\n`);
