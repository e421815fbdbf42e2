// The scene's story, at the top of the figures panel: its name in full, its
// notes (what it shows, what to try; they travel with the scenario and its
// link) and, most prominently, why each masked target is not seen.

import { h } from './dom.js';
import { restate, units } from './units.js';

const LongNotes = 600; // characters

export class Story {
  // before: the element the story goes in front of.
  constructor(before) {
    this.root = h('section', { class: 'story', 'aria-label': 'About this scene' });
    before.before(this.root);
    this.key = '';
    this.open = false;
  }

  // scenario: the editor's scene (notes are shown as typed); report: the
  // plotted scene's report, for the masked targets.
  render(scenario, report) {
    const name = (scenario && scenario.name) || '';
    const notes = (scenario && scenario.notes) || '';
    const masked = ((report && report.targets) || []).filter((t) => t.status === 'masked');
    const key = JSON.stringify([name, notes, masked.map((t) => [t.id, t.masked_by, t.reason]), this.open, units()]);
    if (key === this.key) return;
    this.key = key;
    const parts = [h('h2', { class: 'story-name', title: name }, name || 'Untitled scene')];
    if (notes) {
      // Notes of a paragraph or two show whole; longer ones fold.
      const long = notes.length > LongNotes;
      parts.push(h('p', { class: long && !this.open ? 'story-notes folded' : 'story-notes' }, notes));
      if (long) {
        parts.push(h('button', {
          type: 'button', class: 'linkish', 'aria-expanded': String(this.open),
          onclick: () => { this.open = !this.open; this.render(scenario, report); },
        }, this.open ? 'Show less' : 'Show all notes'));
      }
    } else {
      parts.push(h('p', { class: 'story-notes muted' }, 'No notes yet. Write what this scene shows in the Scene tab; notes travel with the scenario and its link.'));
    }
    for (const t of masked) {
      parts.push(h('div', { class: 'story-masked', role: 'note', dataset: { target: t.id } },
        h('div', { class: 'story-masked-head' }, h('span', { class: 'dot st-masked', 'aria-hidden': 'true' }),
          h('b', {}, t.id), ` is hidden${t.masked_by === t.id ? ' by its own sidelobes' : t.masked_by ? ` by ${t.masked_by}` : ''}`),
        h('p', {}, restate(t.reason || ''))));
    }
    this.root.replaceChildren(...parts);
  }
}
