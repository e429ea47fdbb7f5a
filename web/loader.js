// Fetch a dataset (manifest plus the files it names) and build an Engine from its texts.
// The engine validates everything; this module only moves text around and checks where
// it comes from. A later "open your own files" panel calls engineFromTexts directly.
import { Engine, manifestFiles } from './pkg/stratamap.js';
import { checkDataUrl } from './link.js';

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
  return response.text();
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
  const fileUrl = (name) => check(name, manifestUrl);
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
