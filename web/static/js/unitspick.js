// The units control in the page's bar: a small drop-down where the user
// chooses the units of ranges, speeds and heights and the sign of range
// rates. The choice is kept per browser (units.js) and applies to every
// field, table, figure, plot axis and message the page shows.

import { h } from './dom.js';
import { conventions, heightUnits, rangeUnits, setUnits, speedUnits, units, onUnits } from './units.js';

const names = { m: 'm', km: 'km', nmi: 'nmi (1852 m)', 'm/s': 'm/s', 'km/h': 'km/h', kt: 'kt (nmi per hour)', ft: 'ft (0.3048 m)' };
const senses = { opening: 'positive when opening (receding)', closing: 'positive when closing (approaching)' };

// summary is what the closed control says ("nmi · kt · ft · closing +").
const summary = (u) => `${u.range} · ${u.speed} · ${u.height} · ${u.rate} +`;

export function initUnitsPick(before) {
  const u = units();
  const pick = (key, label, choices, words) => h('label', { class: 'units-row' },
    h('span', {}, label),
    h('select', { dataset: { units: key }, 'aria-label': `${label} unit` },
      choices.map((c) => h('option', { value: c, selected: u[key] === c }, words[c] || c))));
  const text = h('span', { class: 'units-now' }, summary(u));
  const box = h('details', { class: 'units-pick', id: 'units-pick' },
    h('summary', { title: 'Units the page shows and accepts (the scenario file and its link stay in SI)' }, 'Units ', text),
    h('div', { class: 'units-panel' },
      pick('range', 'Range', rangeUnits, names),
      pick('speed', 'Speed', speedUnits, names),
      pick('height', 'Height', heightUnits, names),
      pick('rate', 'Range rate', conventions, senses),
      h('p', { class: 'units-note' }, 'Scenario files and links keep metres, m/s and range rates positive when opening; a value may also be typed with its unit (“12 km”).')));
  box.addEventListener('change', (ev) => {
    const key = ev.target.dataset && ev.target.dataset.units;
    if (key) setUnits({ [key]: ev.target.value });
  });
  // Closes on Escape and on a click elsewhere, like a menu.
  addEventListener('click', (ev) => { if (box.open && !box.contains(ev.target)) box.open = false; });
  box.addEventListener('keydown', (ev) => { if (ev.key === 'Escape') box.open = false; });
  onUnits((now) => {
    text.textContent = summary(now);
    for (const sel of box.querySelectorAll('select')) sel.value = now[sel.dataset.units];
  });
  before.before(box);
  return box;
}
