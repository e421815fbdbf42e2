// Words for people: the name of a scenario field ("pilot-boat's RCS"
// rather than "targets[2].rcs_dbsm"), and messages that carry it.

import { splitPath } from './dom.js';
import { detectorFields, frontEndGroups, levelName, radarFields, waveformKinds, windowKinds } from './schema.js';

const targetWords = {
  id: 'id', kind: 'kind', range_m: 'range', range_start_m: 'near edge', range_stop_m: 'far edge',
  rcs_dbsm: 'RCS', rcs_dbsm_per_m: levelName.extended, reflectivity_dbz: levelName.volume,
  range_rate_mps: 'range rate', velocity_spread_mps: 'velocity spread', fluctuation: 'fluctuation', height_m: 'height',
  sigma0_db: 'σ⁰', gamma_db: 'γ', sea_state: 'sea state', polarisation: 'polarisation', role: 'role',
};
const receiverWords = {
  filter: 'compression filter', filter_length_factor: 'filter length', window: 'range weighting',
  doppler_window: 'pulse-to-pulse weighting', detector: 'detector', mti: 'MTI canceller', integration: 'pulse integration',
};
const topWords = { name: 'scene name', notes: 'notes', seed: 'noise seed', version: 'format version', radar: 'radar', waveform: 'waveform', receiver: 'receiver', targets: 'targets', front_end: 'front end', propagation: 'propagation' };

// Target statuses of the report (docs/report-format.md, "Statuses"): a
// short label, and a line saying what it means, for cards, dots and the
// hover card. Their marks share one colour and shape per status with the
// plots (server/charts.go statusStyle, css --st-*).
export const statusWords = {
  detected: ['detected', 'seen on at least the required share of looks (Pd ≥ the required Pd)'],
  masked: ['masked', 'strong enough alone, but another echo (or its own sidelobes) raises the threshold so it is seen too rarely'],
  too_weak: ['too weak', 'too weak to be seen often enough even with nothing else in the scene'],
  eclipsed: ['eclipsed', 'its echo arrives, wholly or enough of it, while the radar transmits'],
  folded: ['folded', 'beyond the unambiguous range: its echo comes back after the next pulse and shows as a false target at the wrong, nearer range'],
  out_of_window: ['out of window', 'its echo is not in the receive window'],
  clutter: ['clutter', 'sea, land, rain or chaff: never a detection; where it crosses the threshold it gives false alarms (its role can be set to target)'],
  below_horizon: ['below the horizon', 'beyond the radar horizon of the antenna\'s and its own height: the Earth\'s curvature hides it'],
};

// pdText writes a probability of detection as the report's text does
// (scenarios.PdText): three decimals, "> 0.999" and "< 0.001" at the ends.
export const pdText = (p) => (p >= 0.9995 ? '> 0.999' : p < 0.0005 ? '< 0.001' : p.toFixed(3));

// statusLabel returns the words for a status ("too weak").
export const statusLabel = (st) => (statusWords[st] ? statusWords[st][0] : String(st || '').replace(/_/g, ' '));

// statusHelp returns what a status means, for a title.
export const statusHelp = (st) => (statusWords[st] ? `${statusWords[st][0]}: ${statusWords[st][1]}` : statusLabel(st));

const labelOf = (fields, key) => {
  const f = fields.find((x) => x.key === key);
  return f ? f.label.toLowerCase().replace(/^p_fa$/, 'Pfa').replace(/\bpd\b/, 'Pd') : null;
};

// fieldName returns a reader's name for the field at a JSON path of the
// scenario s; the path itself when it names nothing known.
export function fieldName(path, s) {
  const p = splitPath(path || '');
  if (!p.length) return 'the scenario';
  if (p[0] === 'targets' && typeof p[1] === 'number') {
    const t = ((s && s.targets) || [])[p[1]];
    const who = t && t.id ? `target “${t.id}”` : `target ${p[1] + 1}`;
    if (p.length === 2) return who;
    return `${who} ${targetWords[p[2]] || p.slice(2).join('.')}`;
  }
  if (p[0] === 'radar' && p.length === 2) return `radar ${labelOf(radarFields, p[1]) || p[1]}`;
  if (p[0] === 'waveform' && p.length >= 2) {
    if (p[1] === 'kind') return 'waveform kind';
    const kind = waveformKinds[s && s.waveform && s.waveform.kind];
    const name = kind && labelOf(kind.fields, p[1]);
    return `waveform ${name || p.slice(1).join('.')}`;
  }
  if (p[0] === 'receiver' && p.length >= 2) {
    const base = receiverWords[p[1]] || p[1];
    if (p.length === 2) return base;
    if (p[1] === 'detector') return `detector ${labelOf(Object.values(detectorFields), p[2]) || p[2]}`;
    if (p[2] === 'kind') return `${base} kind`;
    const win = s && s.receiver && s.receiver[p[1]];
    const wk = win && windowKinds[win.kind];
    return `${base} ${(wk && labelOf(wk.fields, p[2])) || p.slice(2).join('.')}`;
  }
  if ((p[0] === 'front_end' || p[0] === 'propagation') && p.length >= 2) {
    const g = frontEndGroups.find((x) => (x.base || 'front_end') === p[0] && x.fields.some((fd) => fd.key === p[1]));
    return g ? `${g.title} ${labelOf(g.fields, p[1])}` : `front end ${p.slice(1).join('.')}`;
  }
  if (p.length === 1 && topWords[p[0]]) return topWords[p[0]];
  return path;
}

// The server's field errors as one sentence for people.
export function describeFields(fields, s) {
  return (fields || []).map((f) => {
    if (!f.path) return f.message;
    const name = fieldName(f.path, s);
    return name === f.path ? `${f.path}: ${f.message}` : `${name} (${f.path}): ${f.message}`;
  }).join('; ');
}
