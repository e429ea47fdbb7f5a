// Fetch a dataset (manifest plus the files it names) and build an Engine from its texts.
// The engine validates everything; this module only moves text around and checks where
// it comes from. A later "open your own files" panel calls engineFromTexts directly.
import { Engine, manifestFiles } from './pkg/stratamap.js';
import { checkDataUrl } from './link.js';

// The largest file a dataset may have (the core's dataset::MAX_FILE_BYTES, which the
// command line applies too): a bigger one is refused before, or while, it arrives.
const MAX_FILE_BYTES = 100 * 1024 * 1024;

async function readCapped(response, url) {
  const tooBig = () => new Error(`${url.href} is larger than ${MAX_FILE_BYTES} bytes, the most a dataset's file may be.`);
  const declared = Number(response.headers.get('Content-Length'));
  if (Number.isFinite(declared) && declared > MAX_FILE_BYTES) {
    response.body?.cancel();
    throw tooBig();
  }
  if (!response.body) return response.text();
  const reader = response.body.getReader();
  const chunks = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > MAX_FILE_BYTES) {
      reader.cancel();
      throw tooBig();
    }
    chunks.push(value);
  }
  const bytes = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    bytes.set(c, at);
    at += c.byteLength;
  }
  // Like the command line, refuse bytes that are not UTF-8 rather than guess.
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new Error(`${url.href} is not text in UTF-8.`);
  }
}

async function fetchText(url, check) {
  let response;
  try {
    response = await fetch(url, { credentials: 'same-origin', cache: 'no-cache' });
  } catch (e) {
    throw new Error(`Could not fetch ${url.href}: ${e.message}`);
  }
  // A redirect must not lead somewhere the page would not have gone by itself.
  if (response.url && response.url !== url.href) check(response.url);
  if (!response.ok) {
    throw new Error(`Could not fetch ${url.href}: HTTP ${response.status} ${response.statusText}`.trim());
  }
  return readCapped(response, url);
}

/**
 * Load the dataset whose manifest is at `value` (resolved against the page address).
 * Resolves to {url, texts: {manifest, districts, electorate, poll}}; rejects with an Error
 * whose message is meant for people.
 */
export async function fetchDataset(value, { base, pageOrigin, allowed }) {
  const check = (v, b = base) => checkDataUrl(v, b, pageOrigin, allowed);
  const manifestUrl = check(value);
  const manifest = await fetchText(manifestUrl, check);
  const files = manifestFiles(manifest); // throws an Error naming the manifest's problems
  // The core refuses names that leave the manifest's folder (manifestFiles); the page
  // checks the resolved address as well, so nothing outside the folder is ever fetched.
  const folder = new URL('./', manifestUrl);
  const fileUrl = (name) => {
    const url = check(name, manifestUrl);
    if (url.origin !== folder.origin || !url.pathname.startsWith(folder.pathname)) {
      throw new Error(`dataset.json names a file outside the manifest's folder; a dataset reads only the files in its own folder.`);
    }
    return url;
  };
  const [districts, electorate, poll] = await Promise.all([
    fetchText(fileUrl(files.districts), check),
    fetchText(fileUrl(files.electorate), check),
    files.poll ? fetchText(fileUrl(files.poll), check) : Promise.resolve(undefined),
  ]);
  return { url: manifestUrl, texts: { manifest, districts, electorate, poll } };
}

/** Validate and build the engine; throws the engine's Error (problems separated by "\n"). */
export function engineFromTexts({ manifest, districts, electorate, poll }) {
  return new Engine(manifest, districts, electorate, poll ?? undefined);
}
