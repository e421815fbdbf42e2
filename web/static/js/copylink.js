// "Copy link": a link that opens exactly the scene it says it opens. When
// the plots are behind the editor, the link is that of the editor's scene
// if the server accepts it, and otherwise that of the plotted scene, and
// the message says which. When the browser refuses the clipboard (plain
// HTTP on a team network), the link stays on screen, selected, until the
// user closes it.

import { h } from './dom.js';
import { HTTPError, api, refusal } from './share.js';

export function initCopyLink({ button, frame, stale, store, notice }) {
  button.addEventListener('click', async () => {
    const f = frame();
    const { behind, invalid } = stale.facts;
    let link = f && f.link;
    let what = 'it opens this exact scene, as the plots show it.';
    if (invalid) {
      what = `it opens the scene on the plots, the last valid one, without your edit that has an error (${invalid}).`;
    } else if (behind || !link) {
      try {
        link = await api.check(store.scenario);
        what = 'it opens the scene in the editor, with your latest edits (the plots are still catching up).';
      } catch (e) {
        if (e instanceof HTTPError && e.status >= 400 && e.status < 500) {
          what = `it opens the scene on the plots, without your latest edit, which is not valid (${refusal(e, store.scenario)}).`;
        } else {
          what = 'it opens the scene on the plots, without your latest edits, which the server has not seen (no connection).';
        }
      }
    }
    if (!link) {
      notice('There is no scene to link to yet.', 'error');
      return;
    }
    const url = new URL(link, location.href).href;
    try {
      await navigator.clipboard.writeText(url);
      notice(`Share link copied: ${what} Anyone running Pulsewright can open it.`);
    } catch {
      const field = h('input', { type: 'text', readonly: true, class: 'link-out', value: url, 'aria-label': 'Share link', spellcheck: 'false' });
      field.addEventListener('focus', () => field.select());
      notice(`The browser did not allow copying to the clipboard. Select the link below and copy it (Ctrl+C): ${what}`, 'link', field);
      field.focus();
      field.select();
    }
  });
}
