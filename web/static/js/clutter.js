// Clutter on the page: the role and the surface reflectivity of extended
// and volume targets in the target form, and the clutter figures of the
// report (CNR, SCR, breakthrough, the detector's false-alarm rate) on the
// target cards (docs/detection.md §10).

import { h } from './dom.js';
import { format, unit } from './units.js';

// The ways to give an extended target's reflectivity: field, label, unit,
// value on switching to it.
export const surfaceForms = [
  ['sigma0_db', 'σ⁰, constant', 'dB', -30],
  ['gamma_db', 'γ, constant-γ (σ⁰ = γ·sin ψ)', 'dB', -15],
  ['sea_state', 'Sea state (NRL sea model)', '0 … 6', 3],
  ['rcs_dbsm_per_m', 'RCS per metre (advanced)', 'dBsm/m', -20],
];

// The field that gives an extended target's reflectivity.
export function surfaceKey(t) {
  for (const [k] of surfaceForms) if (t && t[k] !== undefined) return k;
  return 'rcs_dbsm_per_m';
}

// The level of a target as the table and form show it: field, name, unit,
// short name.
export function levelOf(t) {
  if (t.kind === 'point') return { key: 'rcs_dbsm', name: 'RCS', unit: 'dBsm', short: 'RCS' };
  if (t.kind === 'volume') return { key: 'reflectivity_dbz', name: 'reflectivity', unit: 'dBZ', short: 'Refl.' };
  const k = surfaceKey(t);
  if (k === 'sigma0_db') return { key: k, name: 'σ⁰ (surface reflectivity)', unit: 'dB', short: 'σ⁰' };
  if (k === 'gamma_db') return { key: k, name: 'γ (constant-γ surface)', unit: 'dB', short: 'γ' };
  if (k === 'sea_state') return { key: k, name: 'Sea state (NRL sea model)', unit: '0 … 6', short: 'Sea' };
  return { key: k, name: 'RCS per metre', unit: 'dBsm/m', short: 'RCS/m' };
}

const roleOptions = [['clutter', 'clutter: its crossings are false alarms'], ['target', 'target: judge it as one']];

// The clutter fields of target i's form: how an extended target's
// reflectivity is given, and the role of an extended or volume target.
export function clutterFields(editor, s, i, t) {
  if (t.kind === 'point') return [];
  const base = `targets[${i}]`;
  const out = [];
  if (t.kind === 'extended') {
    const cur = surfaceKey(t);
    const id = `f-targets_${i}_surface`;
    const sel = h('select', { id, class: 'surface-form', title: 'σ⁰, γ and sea state take the grazing angle from the antenna height (Radar tab) on a 4/3 Earth; the patch is σ⁰·R·θaz·(c/2B)·sec ψ. A sea state takes σ⁰ from the NRL sea model (Gregers-Hansen & Mital 2012: 0.5 … 35 GHz, grazing 0.1 … 60°). RCS per metre is the same at every range.' },
      surfaceForms.map(([k, label]) => h('option', { value: k, selected: k === cur }, label)));
    sel.addEventListener('change', () => {
      const k = sel.value;
      const def = surfaceForms.find((f) => f[0] === k)[3];
      editor.store.update((sc) => {
        const x = sc.targets[i];
        for (const [f] of surfaceForms) delete x[f];
        delete x.polarisation;
        x[k] = def;
      }, `surface:${i}`);
    });
    out.push(h('div', { class: 'field wide' }, h('label', { for: id }, 'Surface given by'), sel));
    if (cur === 'sea_state') {
      out.push(editor.field(s, base, { key: 'polarisation', label: 'Polarisation', unit: '', scale: 1, type: 'select', options: ['horizontal', 'vertical'], def: 'horizontal' }));
    }
  }
  out.push(editor.field(s, base, { key: 'role', label: 'Role', unit: '', scale: 1, type: 'select', options: roleOptions, def: 'clutter', wide: true }));
  return out;
}

const fmt = (v, d = 1) => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(d) : '—');
const signed = (v) => `${v >= 0 ? '+' : ''}${fmt(v)}`;
// A range in the user's unit (units.js); in metres, km from 10 km up.
const km = (m) => (unit('range') !== 'm' ? format('range', m, 0) : m >= 10000 ? `${(m / 1000).toFixed(2)} km` : `${Math.round(m)} m`);
const CNRHelp = 'CNR: the clutter power (every clutter object) in this target’s cell, in dB above the noise.';
const SCRHelp = 'SCR: this target’s peak over the clutter power in its cell, in dB.';
const BTHelp = 'Breakthrough: cells where this clutter crosses the threshold. Each is a false alarm; the spans are shaded on the profile.';

// The clutter numbers of one target card.
export function clutterNums(t) {
  const out = [];
  const map = t.cnr_integrated_db !== undefined;
  if (t.cnr_db !== undefined) out.push(h('span', { class: 'cnr', title: CNRHelp }, `CNR ${fmt(t.cnr_db)} dB`));
  if (t.scr_db !== undefined) out.push(h('span', { class: 'scr', title: SCRHelp }, `SCR ${signed(t.scr_db)} dB`));
  if (map) out.push(h('span', { class: 'cnr', title: `${CNRHelp} On the range–Doppler map.` }, `map CNR ${fmt(t.cnr_integrated_db)} dB`));
  if (t.scr_integrated_db !== undefined) out.push(h('span', { class: 'scr', title: `${SCRHelp} On the range–Doppler map.` }, `map SCR ${signed(t.scr_integrated_db)} dB`));
  if (t.cell_rcs_dbsm !== undefined) {
    let s = `cell ${fmt(t.cell_rcs_dbsm)} dBsm`;
    if (t.sigma0_db !== undefined) s += ` (σ⁰ ${fmt(t.sigma0_db)} dB, ψ ${fmt(t.grazing_deg, 2)}°)`;
    out.push(h('span', { title: 'Radar cross-section of one range cell (c/2B) at its strongest range' }, s));
  }
  const b = t.breakthrough;
  if (b) {
    const where = (b.spans || []).slice(0, 2).map((sp) => (sp.stop_m - sp.start_m < 0.5 ? km(sp.start_m) : `${km(sp.start_m)}–${km(sp.stop_m)}`)).join(', ');
    out.push(b.cells > 0
      ? h('span', { class: 'bt', title: BTHelp }, `${b.cells} false-alarm cell${b.cells === 1 ? '' : 's'}${where ? ` at ${where}` : ''}${(b.spans || []).length > 2 ? ' …' : ''}`)
      : h('span', { class: 'bt-none', title: BTHelp }, 'no breakthrough'));
  }
  return out;
}

const every = (s) => (s >= 86400 ? `${fmt(s / 86400)} days` : s >= 3600 ? `${fmt(s / 3600)} h` : s >= 60 ? `${fmt(s / 60)} min` : s >= 1 ? `${fmt(s)} s` : `${fmt(s * 1e3)} ms`);

// The detector's false-alarm rate and the scene's clutter, under the cards.
export function clutterSummary(report) {
  const fa = report.false_alarms;
  const cl = report.clutter;
  if (!fa && !cl) return null;
  const lines = [];
  if (fa) {
    const look = fa.look_s >= 1e-3 ? `${fmt(fa.look_s * 1e3, 2)} ms` : `${fmt(fa.look_s * 1e6)} µs`;
    lines.push(h('li', { title: 'Against noise alone: Pfa × independent cells per second. Neighbouring gates share noise, so a cluster of crossings counts once; docs/detection.md §10.' },
      `False alarms from noise: ${fa.rate_per_s.toPrecision(3)} per s`, fa.mean_interval_s ? ` (one every ${every(fa.mean_interval_s)})` : '',
      ` = Pfa ${fa.pfa.toExponential(0)} × ${Math.round(fa.independent_cells)} independent cells (of ${fa.tested_cells} tested) per ${look}`));
  }
  if (cl) {
    let s = cl.cnr_peak_db !== undefined ? `Clutter: peak CNR ${fmt(cl.cnr_peak_db)} dB at ${km(cl.cnr_peak_range_m)}` : 'Clutter: none in the processed gates';
    if (cl.cnr_peak_integrated_db !== undefined) s += `, ${fmt(cl.cnr_peak_integrated_db)} dB on the map`;
    s += cl.breakthrough_cells > 0 ? `; ${cl.breakthrough_cells} cells break through (false alarms)` : '; no cell breaks through';
    lines.push(h('li', { class: cl.breakthrough_cells > 0 ? 'bt' : '' }, s));
  }
  return h('div', { class: 'clutter-sum' }, h('h3', {}, 'False alarms'), h('ul', {}, lines));
}
