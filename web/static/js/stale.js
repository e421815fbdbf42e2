// Whether the plots show the scene in the editor. When they do not (an
// edit still on its way or being computed, an invalid value, no
// connection), a banner on the plots says so and the plots are dimmed, so
// that nobody reads an old picture as the current one.

import { h } from './dom.js';

// Edits younger than this are not flagged: most frames arrive sooner, and
// a banner that flashes on every keystroke would be noise.
const PendingAfterMs = 250;

export class Staleness {
  // plots: the element holding the plots; the banner goes inside it.
  constructor(plots) {
    this.plots = plots;
    this.text = h('span', { class: 'stale-text' });
    this.banner = h('div', { class: 'stale-banner', role: 'status', 'aria-live': 'polite', hidden: true },
      h('span', { class: 'stale-icon', 'aria-hidden': 'true' }, '⚠'), this.text);
    plots.append(this.banner);
    this.kind = 'none';
    this.behindSince = 0;
    this.timer = 0;
    this.facts = { behind: false, invalid: null, offline: false };
  }

  // facts: behind (the editor's scene differs from the plotted one),
  // invalid (a sentence naming the invalid field, or null), offline.
  update(facts) {
    this.facts = facts;
    if (!facts.behind) this.behindSince = 0;
    else if (!this.behindSince) this.behindSince = performance.now();
    this.render();
  }

  render() {
    const { behind, invalid, offline } = this.facts;
    let kind = 'none';
    let text = '';
    if (invalid) {
      kind = 'invalid';
      text = `Not updated: ${invalid}. The plots and figures show the last valid scene.`;
    } else if (offline) {
      kind = 'offline';
      text = behind
        ? 'Offline: the plots and figures show the scene before your latest edits; they update when the server is back.'
        : 'Offline: the server cannot be reached, so the plots will not follow edits until it is back.';
    } else if (behind) {
      const age = performance.now() - this.behindSince;
      if (age >= PendingAfterMs) {
        kind = 'pending';
        text = `Updating… the plots and figures still show the scene before your latest edit (${(age / 1000).toFixed(1)} s).`;
      }
      clearTimeout(this.timer);
      this.timer = setTimeout(() => this.render(), age >= PendingAfterMs ? 500 : PendingAfterMs - age + 5);
    }
    if (this.text.textContent !== text) this.text.textContent = text;
    if (kind === this.kind) return;
    // Only on a change: the body's attribute restyles the whole page.
    this.kind = kind;
    this.banner.hidden = kind === 'none';
    this.banner.dataset.kind = kind;
    this.plots.classList.toggle('stale', kind !== 'none');
    document.body.dataset.stale = kind;
  }
}
