// The scenario format (docs/scenario-format.md, version 2) as the
// editor needs it: kinds, the fields of each kind, display units and
// defaults. Values are stored in SI as the format has them; `scale` is the
// size of one display unit in SI (1e-6 shows seconds as µs).

export const C = 299792458;

// A field: path relative to its object, label, unit, scale, type
// ('num' | 'int' | 'text' | 'select'), options, default shown as a hint.
import { surfaceKey } from './clutter.js';

const f = (key, label, unit = '', scale = 1, type = 'num', extra = {}) => ({ key, label, unit, scale, type, ...extra });

export const radarFields = [
  f('carrier_hz', 'Carrier', 'GHz', 1e9, 'num', { def: 9.5e9 }),
  f('peak_power_w', 'Peak power', 'W', 1, 'num', { def: 1000 }),
  f('antenna_gain_dbi', 'Antenna gain', 'dBi', 1, 'num', { def: 30 }),
  f('noise_figure_db', 'Noise figure', 'dB', 1, 'num', { def: 3 }),
  f('system_loss_db', 'System loss', 'dB', 1, 'num', { def: 3 }),
  f('sample_rate_hz', 'Sample rate', 'MHz', 1e6, 'num', { hint: '2 × B' }),
  f('pri_s', 'PRI', 'µs', 1e-6, 'num', { def: 1e-3 }),
  f('pulses', 'Pulses', '', 1, 'int', { def: 1 }),
  f('window_start_m', 'Window start', 'm', 1, 'num', { def: 0, qty: 'range' }),
  f('window_stop_m', 'Window stop', 'm', 1, 'num', { hint: 'c·PRI/2', qty: 'range' }),
  f('beamwidth_az_deg', 'Beamwidth az', '°', 1, 'num', { def: 2 }),
  f('beamwidth_el_deg', 'Beamwidth el', '°', 1, 'num', { def: 2 }),
  f('antenna_height_m', 'Antenna height', 'm', 1, 'num', { hint: 'none' }),
];

const chip = f('chip_s', 'Chip length', 'µs', 1e-6);
const codeLen = f('length', 'Length', 'chips', 1, 'int');
export const waveformKinds = {
  rect: { label: 'Rectangular (unmodulated)', fields: [f('pulse_width_s', 'Pulse width', 'µs', 1e-6)] },
  lfm: {
    label: 'Linear FM',
    fields: [f('pulse_width_s', 'Pulse width', 'µs', 1e-6), f('bandwidth_hz', 'Bandwidth', 'MHz', 1e6),
      f('sweep', 'Sweep', '', 1, 'select', { options: ['up', 'down'], def: 'up' })],
  },
  nlfm: {
    label: 'Non-linear FM',
    fields: [f('pulse_width_s', 'Pulse width', 'µs', 1e-6), f('bandwidth_hz', 'Bandwidth', 'MHz', 1e6),
      f('design_sidelobe_db', 'Design sidelobe', 'dB', 1, 'num', { def: -40 })],
  },
  barker: { label: 'Barker code', fields: [f('length', 'Length', 'chips', 1, 'select', { options: [2, 3, 4, 5, 7, 11, 13], int: true }), chip] },
  mps: { label: 'Minimum peak sidelobe code', fields: [codeLen, chip] },
  mls: { label: 'Maximal-length sequence', fields: [f('degree', 'Degree n (2ⁿ−1 chips)', '', 1, 'int'), chip] },
  frank: { label: 'Frank code', fields: [codeLen, chip] },
  p1: { label: 'P1 code', fields: [codeLen, chip] },
  p2: { label: 'P2 code', fields: [codeLen, chip] },
  p3: { label: 'P3 code', fields: [codeLen, chip] },
  p4: { label: 'P4 code', fields: [codeLen, chip] },
  zadoff_chu: { label: 'Zadoff–Chu', fields: [codeLen, f('root', 'Root', '', 1, 'int'), chip] },
  costas: { label: 'Costas frequency hops', fields: [codeLen, chip] },
  phase_code: {
    label: 'Own phase code',
    fields: [f('phases_deg', 'Phases', '° per chip', 1, 'phases'), f('binary', 'Binary', '+/−', 1, 'text'), chip],
  },
  // Imported I/Q samples (pulsewright import writes them in); the arrays
  // themselves are kept as they are, only the rate and bandwidth are edited.
  samples: {
    label: 'Imported samples',
    fields: [f('sample_rate_hz', 'Samples\u2019 rate', 'MHz', 1e6), f('bandwidth_hz', 'Bandwidth', 'MHz', 1e6)],
  },
};

// A fresh waveform of a kind, keeping the pulse's time scale where it can.
export function newWaveform(kind, old) {
  const tau = old ? pulseWidth(old) : 20e-6;
  const B = old ? bandwidth(old) : 5e6;
  const chipFor = (n) => roundSig(Math.max(tau / n, 1e-9), 3);
  switch (kind) {
    case 'rect': return { kind, pulse_width_s: roundSig(tau, 3) };
    case 'lfm': return { kind, pulse_width_s: roundSig(tau, 3), bandwidth_hz: roundSig(B, 3) };
    case 'nlfm': return { kind, pulse_width_s: roundSig(tau, 3), bandwidth_hz: roundSig(B, 3), design_sidelobe_db: -40 };
    case 'barker': return { kind, length: 13, chip_s: chipFor(13) };
    case 'mps': return { kind, length: 24, chip_s: chipFor(24) };
    case 'mls': return { kind, degree: 7, chip_s: chipFor(127) };
    case 'frank': case 'p1': case 'p2': return { kind, length: 64, chip_s: chipFor(64) };
    case 'p3': case 'p4': return { kind, length: 64, chip_s: chipFor(64) };
    case 'zadoff_chu': return { kind, length: 63, root: 1, chip_s: chipFor(63) };
    case 'costas': return { kind, length: 10, chip_s: chipFor(10) };
    case 'phase_code': return { kind, binary: '+++--+-', chip_s: chipFor(7) };
    case 'samples': {
      // A plain pulse of 16 samples at 2B until a recording is imported.
      const rate = roundSig(2 * B, 3);
      return { kind, sample_rate_hz: rate, bandwidth_hz: roundSig(B, 3), i: Array(16).fill(1), q: Array(16).fill(0) };
    }
  }
  return { kind };
}

export function pulseWidth(w) {
  if (w.pulse_width_s) return w.pulse_width_s;
  if (w.kind === 'samples') return (w.i || w.amplitude || []).length / (w.sample_rate_hz || 1);
  return chips(w) * (w.chip_s || 0);
}

export function chips(w) {
  switch (w.kind) {
    case 'mls': return 2 ** (w.degree || 0) - 1;
    case 'phase_code': return w.binary ? w.binary.length : (w.phases_deg || []).length;
  }
  return w.length || 0;
}

export function bandwidth(w) {
  switch (w.kind) {
    case 'rect': return 1 / w.pulse_width_s;
    case 'lfm': case 'nlfm': case 'samples': return w.bandwidth_hz;
    case 'costas': return (w.length || 1) / w.chip_s;
  }
  return w.chip_s ? 1 / w.chip_s : 0;
}

export const windowKinds = {
  none: { label: 'None (uniform)', fields: [] },
  hann: { label: 'Hann', fields: [] },
  hamming: { label: 'Hamming', fields: [] },
  blackman: { label: 'Blackman', fields: [] },
  blackman_harris: { label: 'Blackman–Harris (4-term)', fields: [] },
  taylor: { label: 'Taylor', fields: [f('sidelobe_db', 'Sidelobe level', 'dB', 1, 'num', { def: -35 }), f('nbar', 'n̄', '', 1, 'int', { def: 5 })] },
  chebyshev: { label: 'Dolph–Chebyshev', fields: [f('sidelobe_db', 'Sidelobe level', 'dB', 1, 'num', { def: -50 })] },
  kaiser: { label: 'Kaiser', fields: [f('beta', 'β', '', 1, 'num', { def: 6 })] },
  gaussian: { label: 'Gaussian', fields: [f('sigma', 'σ', '× half length', 1, 'num', { def: 0.4 })] },
};

export const detectorKinds = {
  ca_cfar: { label: 'Cell-averaging CFAR', fields: ['pfa', 'pd_required', 'guard_cells', 'training_cells'] },
  os_cfar: { label: 'Ordered-statistic CFAR', fields: ['pfa', 'pd_required', 'guard_cells', 'training_cells', 'rank'] },
  go_cfar: { label: 'Greatest-of CFAR (clutter edges)', fields: ['pfa', 'pd_required', 'guard_cells', 'training_cells'] },
  so_cfar: { label: 'Smallest-of CFAR (targets beside clutter)', fields: ['pfa', 'pd_required', 'guard_cells', 'training_cells'] },
  censored_cfar: { label: 'Censored cell-averaging CFAR', fields: ['pfa', 'pd_required', 'guard_cells', 'training_cells', 'censored_cells'] },
  fixed: { label: 'Fixed threshold', fields: ['pfa', 'pd_required'] },
};
export const detectorFields = {
  pfa: f('pfa', 'Pfa', 'per cell', 1, 'num', { def: 1e-6, sci: true }),
  // Statuses are decided on Pd at this value (docs/detection.md §6).
  pd_required: f('pd_required', 'Required Pd', 'to detect', 1, 'num', { def: 0.9 }),
  guard_cells: f('guard_cells', 'Guard cells', 'each side', 1, 'int', { def: 2 }),
  training_cells: f('training_cells', 'Training cells', 'both sides', 1, 'int', { def: 16 }),
  rank: f('rank', 'Rank', '1-based', 1, 'int', { hint: '¾ of training' }),
  censored_cells: f('censored_cells', 'Censored cells', 'largest dropped', 1, 'int', { hint: '⅛ of training' }),
};

export const targetKinds = ['point', 'extended', 'volume'];
export const fluctuations = [['none', 'none (steady)'], ['swerling1', 'Swerling 1'], ['swerling2', 'Swerling 2'], ['swerling3', 'Swerling 3'], ['swerling4', 'Swerling 4']];

// Waveform kinds that are phase codes (mismatched filters apply to them).
const phaseCodes = new Set(['barker', 'mps', 'mls', 'frank', 'p1', 'p2', 'p3', 'p4', 'zadoff_chu', 'phase_code']);
export const isPhaseCode = (kind) => phaseCodes.has(kind);

// A small or large number as people write it in scientific notation
// ("1e-6", "2.5e-4"); ordinary numbers as they are.
export function sciDisplay(v) {
  if (typeof v !== 'number' || !Number.isFinite(v)) return toDisplay(v, 1);
  const a = Math.abs(v);
  if (a === 0 || (a >= 1e-3 && a < 1e6)) return toDisplay(v, 1);
  return v.toExponential().replace(/\.?0+e/, 'e').replace('e+', 'e');
}

// The level field of a target kind and its unit; an extended target t
// may give σ⁰ or γ instead of its RCS per metre (clutter.js).
export function levelKey(kind, t) {
  if (kind === 'extended' && t) return surfaceKey(t);
  return kind === 'extended' ? 'rcs_dbsm_per_m' : kind === 'volume' ? 'reflectivity_dbz' : 'rcs_dbsm';
}
export const levelUnit = { point: 'dBsm', extended: 'dBsm/m', volume: 'dBZ' };
export const levelName = { point: 'RCS', extended: 'RCS per metre', volume: 'reflectivity' };
export const levelShort = { point: 'RCS', extended: 'RCS/m', volume: 'Refl.' };
export const kindShort = { point: 'point', extended: 'ext.', volume: 'vol.' };
export const kindTitle = { point: 'point target', extended: 'extended target (spread in range)', volume: 'volume target (weather)' };

// The near range of a target (its range for a point target).
export function targetRange(t) {
  return t.kind === 'point' ? t.range_m : t.range_start_m;
}

// Convert a target to another kind, keeping id, range and range rate.
export function convertTarget(t, kind) {
  const r = targetRange(t) ?? 1000;
  const out = { id: t.id, kind };
  if (kind === 'point') {
    Object.assign(out, { range_m: r, rcs_dbsm: 10 });
  } else {
    const stop = t.range_stop_m ?? r + 500;
    Object.assign(out, { range_start_m: r, range_stop_m: stop });
    out[levelKey(kind)] = kind === 'extended' ? -20 : 30;
  }
  if (t.range_rate_mps) out.range_rate_mps = t.range_rate_mps;
  return out;
}

// A unique target id built on base.
export function uniqueId(targets, base) {
  const ids = new Set(targets.map((t) => t.id));
  if (!ids.has(base)) return base;
  const stem = base.replace(/-\d+$/, '');
  for (let i = 2; ; i++) {
    if (!ids.has(`${stem}-${i}`)) return `${stem}-${i}`;
  }
}

export function roundSig(x, n) {
  if (!isFinite(x) || x === 0) return x;
  return Number(x.toPrecision(n));
}

// Display text of an SI value in a field's unit.
export function toDisplay(v, scale) {
  if (v === undefined || v === null || v === '') return '';
  if (typeof v !== 'number') return String(v);
  return String(Number((v / scale).toPrecision(12)));
}

// Parse display text to an SI value: undefined for empty text (the field
// then takes its default), NaN for text that is not a number.
export function fromDisplay(text, scale, isInt) {
  const s = text.trim().replace(',', '.').replace(/^\u2212/, '-');
  if (s === '') return undefined;
  const n = Number(s);
  if (!Number.isFinite(n)) return NaN;
  if (isInt) return n;
  return Number((n * scale).toPrecision(15));
}

// front_end (added in version 2; docs/scenario-format.md): impairments of
// the oscillator and the receiver, each off while its fields are empty.
// Grouped for the editor's own collapsible section (frontend.js).
export const frontEndGroups = [
  {
    title: 'Oscillator phase noise', fields: [
      f('phase_noise_offsets_hz', 'Offsets', 'Hz', 1, 'phases', { wide: true, hint: '1e3, 1e5, 1e7' }),
      f('phase_noise_dbc_hz', 'Levels L(f)', 'dBc/Hz', 1, 'phases', { wide: true, hint: '-90, -120, -140' }),
    ],
  },
  {
    title: 'ADC', fields: [
      f('adc_bits', 'Bits', 'per channel', 1, 'int', { hint: 'none' }),
      f('adc_full_scale_db', 'Full scale', 'dB re noise', 1, 'num', { hint: 'with bits' }),
    ],
  },
  {
    title: 'I/Q error and DC', fields: [
      f('iq_gain_db', 'Q gain re I', 'dB', 1, 'num', { def: 0 }),
      f('iq_phase_deg', 'Q phase error', '°', 1, 'num', { def: 0 }),
      f('dc_offset_db', 'DC offset', 'dB re noise', 1, 'num', { hint: 'none' }),
    ],
  },
  {
    title: 'Sensitivity time control', fields: [
      f('stc_start_m', 'Start', 'm', 1, 'num', { hint: 'none' }),
      f('stc_stop_m', 'Stop', 'm', 1, 'num', { hint: 'none' }),
      f('stc_exponent', 'Law R^n, n', '', 1, 'num', { def: 4 }),
    ],
  },
  {
    // propagation (added in version 2): rain on the path (ITU-R P.838-2)
    // and multipath over a flat sea (needs the radar's antenna height).
    title: 'Path: rain and sea multipath', base: 'propagation', fields: [
      f('rain_rate_mm_h', 'Rain rate', 'mm/h', 1, 'num', { hint: 'none' }),
      f('rain_polarisation', 'Polarisation', '', 1, 'select', { options: ['horizontal', 'vertical'], def: 'horizontal' }),
      f('rain_start_m', 'From', 'm', 1, 'num', { def: 0 }),
      f('rain_stop_m', 'To', 'm', 1, 'num', { hint: 'whole path' }),
      f('multipath', 'Multipath', '', 1, 'select', { options: [['none', 'none'], ['flat_sea', 'flat sea']], def: 'none' }),
    ],
  },
  {
    // propagation.gas (added in version 2): oxygen and water vapour on the
    // path, ITU-R P.676-13 Annex 1, for the air given (defaults: 15 °C,
    // 1013.25 hPa, 7.5 g/m³).
    title: 'Path: air (oxygen, water vapour)', base: 'propagation', fields: [
      f('gas', 'Gases', '', 1, 'select', { options: [['none', 'none'], ['itu_p676', 'ITU-R P.676']], def: 'none' }),
      f('air_temperature_c', 'Temperature', '°C', 1, 'num', { def: 15 }),
      f('air_pressure_hpa', 'Pressure', 'hPa', 1, 'num', { def: 1013.25 }),
      f('water_vapour_g_m3', 'Water vapour', 'g/m³', 1, 'num', { def: 7.5 }),
    ],
  },
];
