// The page's address: which dataset (`data`), and the scenario string that the engine
// parses (SPEC 3). The page owns only the keys in PAGE_KEYS; everything else in the
// query goes to engine.setScenario unchanged, byte for byte.

export const DEFAULT_DATA = 'maps-demo/dataset.json';

// Keys that belong to the page, not to the scenario. (A later embed mode adds "embed" here.)
export const PAGE_KEYS = new Set(['data']);

function decodeKey(piece) {
  const raw = piece.split('=', 1)[0].replace(/\+/g, ' ');
  try {
    return decodeURIComponent(raw);
  } catch {
    return raw;
  }
}

/**
 * Split a location.search string into the page's own parameters and the scenario
 * query (the rest, with its original encoding).
 */
export function splitSearch(search) {
  const query = search.startsWith('?') ? search.slice(1) : search;
  const page = {};
  const rest = [];
  for (const piece of query.split('&')) {
    if (piece === '') continue;
    const key = decodeKey(piece);
    if (PAGE_KEYS.has(key)) {
      // When a key appears twice, the last one wins.
      page[key] = new URLSearchParams(piece).get(key) ?? '';
    } else {
      rest.push(piece);
    }
  }
  return { page, scenario: rest.join('&') };
}

/** Origins the hosting page allows besides its own: <meta name="stratamap-allow-origins">. */
export function allowedOrigins(doc = document) {
  const meta = doc.querySelector('meta[name="stratamap-allow-origins"]');
  const list = (meta?.getAttribute('content') ?? '').split(/\s+/).filter(Boolean);
  const origins = new Set();
  for (const item of list) {
    try {
      const u = new URL(item);
      if (u.protocol === 'http:' || u.protocol === 'https:') origins.add(u.origin);
    } catch {
      // An unparsable entry allows nothing.
    }
  }
  return origins;
}

/**
 * Resolve a dataset address against base and check it: only http(s), and only this
 * page's origin or one the hosting page allows. Returns a URL or throws an Error
 * whose message says why.
 */
export function checkDataUrl(value, base, pageOrigin, allowed) {
  let url;
  try {
    url = new URL(value, base);
  } catch {
    throw new Error(`The dataset address "${value}" is not a valid URL.`);
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') {
    throw new Error(
      `The dataset address "${value}" was refused: only http and https addresses are loaded.`,
    );
  }
  if (url.origin !== pageOrigin && !allowed.has(url.origin)) {
    throw new Error(
      `The dataset address "${value}" was refused: it is on another site (${url.origin}), ` +
        'and this page loads data only from its own site or from sites it names as allowed.',
    );
  }
  return url;
}

/** The query for the address bar: data (when not the default) then the scenario. */
export function buildSearch(dataParam, scenarioQuery) {
  const parts = [];
  if (dataParam !== null && dataParam !== undefined && dataParam !== DEFAULT_DATA) {
    parts.push(`data=${encodeURIComponent(dataParam)}`);
  }
  if (scenarioQuery) parts.push(scenarioQuery);
  return parts.length ? `?${parts.join('&')}` : '';
}

/** Write the address without adding a history entry. */
export function writeAddress(dataParam, scenarioQuery) {
  const search = buildSearch(dataParam, scenarioQuery);
  const next = `${location.pathname}${search}${location.hash}`;
  if (next !== `${location.pathname}${location.search}${location.hash}`) {
    history.replaceState(history.state, '', next);
  }
}
