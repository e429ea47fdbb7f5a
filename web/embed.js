// The embed for articles (`embed=1`, `show=`): the page's compact layout inside an
// iframe, its height posted to the host page (see README "Embedding in an article"),
// and the "copy embed code" control of the normal page.
import { el } from './dom.js';

export const HEIGHT_MESSAGE = 'stratamap:height';

/**
 * While the page is in an iframe, post its height to the parent whenever it changes:
 * {"type": "stratamap:height", "height": <CSS px>}, target origin "*" (the height is no
 * secret). Returns a function that stops.
 */
export function postHeight(doc = document) {
  if (window.parent === window) return () => {};
  let last = -1;
  const send = () => {
    const height = Math.ceil(doc.documentElement.getBoundingClientRect().height);
    if (height === last) return;
    last = height;
    window.parent.postMessage({ type: HEIGHT_MESSAGE, height }, '*');
  };
  const observer = new ResizeObserver(send);
  observer.observe(doc.documentElement);
  observer.observe(doc.body);
  send();
  return () => observer.disconnect();
}

/** The few lines a host page needs to size the iframe (also in the README). */
export const HOST_SCRIPT = `<script>
addEventListener('message', function (e) {
  var d = e.data;
  if (!d || d.type !== '${HEIGHT_MESSAGE}' || typeof d.height !== 'number') return;
  for (var f of document.querySelectorAll('iframe.stratamap-embed')) {
    if (f.contentWindow === e.source) f.style.height = Math.ceil(d.height) + 'px';
  }
});
</script>`;

function escapeAttr(text) {
  return String(text).replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

/**
 * The iframe snippet for a page address: `pageUrl` (the page without query), the
 * canonical scenario string, the groups to show (ids; empty: all) and a title.
 */
export function embedCode(pageUrl, scenarioQuery, showIds, title) {
  const params = scenarioQuery
    .split('&')
    .filter((p) => p && !/^(embed|show)=/.test(p));
  params.push('embed=1');
  if (showIds.length) params.push(`show=${showIds.map(encodeURIComponent).join(',')}`);
  const src = `${pageUrl}?${params.join('&')}`;
  const iframe =
    `<iframe class="stratamap-embed" src="${escapeAttr(src)}" title="${escapeAttr(title)}"` +
    ' width="100%" height="640" style="border:0;width:100%;max-width:760px"' +
    ' loading="lazy" referrerpolicy="no-referrer"' +
    ' sandbox="allow-scripts allow-same-origin allow-downloads allow-popups"' +
    ' allow="clipboard-write"></iframe>';
  return `${iframe}\n${HOST_SCRIPT}`;
}

/**
 * The "copy embed code" control: pick the groups, then copy (or select) the snippet.
 * `getCode(showIds)` returns the snippet for the scenario on screen.
 */
export function embedControl(groups, getCode, onCopied) {
  const boxes = groups.map((g, i) =>
    el('label', { class: 'embed-group' }, el('input', { type: 'checkbox', value: g.id, 'data-group': String(i) }), ' ', g.name),
  );
  const field = el('textarea', { id: 'embed-code', class: 'embed-code', rows: '6', readonly: true, 'aria-label': 'Embed code' });
  const chosen = () => boxes.map((b) => b.querySelector('input')).filter((c) => c.checked).map((c) => c.value);
  const refresh = () => {
    field.value = getCode(chosen());
  };
  for (const b of boxes) b.querySelector('input').addEventListener('change', refresh);
  const copy = el('button', { type: 'button', id: 'copy-embed' }, 'Copy embed code');
  copy.addEventListener('click', async () => {
    refresh();
    try {
      await navigator.clipboard.writeText(field.value);
      onCopied(true);
    } catch {
      field.focus();
      field.select();
      onCopied(false);
    }
  });
  const box = el(
    'details',
    { class: 'embed-box', id: 'embed-box' },
    el('summary', {}, 'Embed in an article'),
    el(
      'p',
      { class: 'note' },
      'An iframe of this scenario in a compact layout for phones: the map first, the seats, and the sliders of the groups you tick (none ticked: every group). ' +
        'The script below it lets the article size the frame to its content.',
    ),
    el('fieldset', { class: 'embed-groups' }, el('legend', {}, 'Groups to show'), boxes),
    copy,
    field,
  );
  box.addEventListener('toggle', refresh);
  return { node: box, refresh };
}
