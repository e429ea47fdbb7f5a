// The message area: problems with a dataset (role=alert) and notes about a link's
// scenario or an action (role=status). Messages are plain text.
import { byId, el } from './dom.js';

const areas = {
  get error() {
    return byId('messages-error');
  },
  get status() {
    return byId('messages-status');
  },
};

/**
 * Show messages of one topic, replacing earlier ones of the same topic.
 * kind: 'error' (role=alert) or 'status' (role=status). lines: strings.
 */
export function showMessages(topic, kind, heading, lines) {
  clearMessages(topic);
  if (!lines.length && !heading) return;
  const box = el(
    'div',
    { class: `message message-${kind}`, dataset: { topic } },
    heading ? el('p', { class: 'message-heading' }, heading) : null,
    lines.length ? el('ul', null, lines.map((line) => el('li', null, line))) : null,
    el(
      'button',
      {
        type: 'button',
        class: 'message-close',
        'aria-label': 'Dismiss this message',
        onclick: () => box.remove(),
      },
      '\u00d7',
    ),
  );
  areas[kind].append(box);
}

export function clearMessages(topic) {
  for (const area of [areas.error, areas.status]) {
    for (const box of area.querySelectorAll('.message')) {
      if (box.dataset.topic === topic) box.remove();
    }
  }
}
