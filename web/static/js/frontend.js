// The editor's "Front end" section: phase noise, ADC, I/Q error, DC
// offset and STC (scenario field front_end). A collapsible block of its
// own at the end of the receive form; it opens by itself when the scene
// has any impairment, and keeps the state the user gave it after that.

import { h } from './dom.js';
import { frontEndGroups } from './schema.js';

export function frontEndBlock(editor, s) {
  const fe = s.front_end || {};
  const on = Object.keys(fe).length > 0 || Object.keys(s.propagation || {}).length > 0;
  const d = h('details', { class: 'sub frontend', open: editor.frontEndOpen ?? on },
    h('summary', {}, 'Front end and path: phase noise, ADC, I/Q, STC, rain, multipath, air', on ? h('span', { class: 'fe-on' }, ' · on') : null),
    h('div', { class: 'err block', dataset: { errFor: 'front_end' } }),
    h('div', { class: 'err block', dataset: { errFor: 'propagation' } }),
    frontEndGroups.map((g) => h('div', { class: 'fe-group' },
      h('div', { class: 'fe-title' }, g.title),
      h('div', { class: 'grid' }, g.fields.map((fd) => editor.field(s, g.base || 'front_end', fd))))),
    h('p', { class: 'muted fe-note' },
      'Each impairment is off while its fields are empty. Levels in dB are re the thermal noise power per sample.'));
  d.addEventListener('toggle', () => { editor.frontEndOpen = d.open; });
  return d;
}
