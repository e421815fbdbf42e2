// The figures panel: the waveform's figures of merit and each target's
// verdict, from the report, beside the pinned reference when there is one.

import { h } from './dom.js';
import { morphChildren } from './morph.js';
import { waveformKinds } from './schema.js';
import { clutterNums, clutterSummary } from './clutter.js';
import { pdText, statusHelp, statusLabel } from './words.js';
import { format, restate, unit } from './units.js';

const fmt = (v, digits = 1) => (v === undefined || v === null || !Number.isFinite(v) ? '—' : v.toFixed(digits));
const eng = (v, unit) => {
  if (v === undefined || v === null || !Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  const [s, p] = a >= 1e9 ? [1e9, 'G'] : a >= 1e6 ? [1e6, 'M'] : a >= 1e3 ? [1e3, 'k'] : a >= 1 || a === 0 ? [1, ''] : a >= 1e-3 ? [1e-3, 'm'] : a >= 1e-6 ? [1e-6, 'µ'] : [1e-9, 'n'];
  return `${Number((v / s).toPrecision(4))} ${p}${unit}`;
};
// A range in the user's unit (units.js); in metres, km from 10 km up.
const metres = (v) => (v === undefined || !Number.isFinite(v) ? '—'
  : unit('range') === 'm' && v >= 10000 ? `${(v / 1000).toFixed(2)} km` : format('range', v, v < 10 ? 2 : 1));
// A range to the metre (a detection range): in metres, km from 10 km up.
const wholeMetres = (v) => (unit('range') === 'm' && v >= 10000 ? `${(v / 1000).toFixed(2)} km` : format('range', v, 0));

// Rows: label, getter, formatter, and whether larger is better (for the
// comparison arrow).
const waveformRows = [
  ['Waveform', (w) => w.kind, (v) => (v ? (waveformKinds[v] ? waveformKinds[v].label : v) : '—')],
  ['Pulse width τ', (w) => w.pulse_width_s, (v) => eng(v, 's')],
  ['Bandwidth B', (w) => w.bandwidth_hz, (v) => eng(v, 'Hz')],
  ['B·τ', (w) => w.time_bandwidth, (v) => fmt(v, 1)],
  ['Compression gain', (w) => w.compression_gain_db, (v) => `${fmt(v)} dB`, true],
  ['PSLR', (w) => w.pslr_db, (v) => `${fmt(v)} dB`, false],
  ['ISLR', (w) => w.islr_db, (v) => `${fmt(v)} dB`, false],
  ['Resolution (−3 dB)', (w) => w.mainlobe_3db_m, metres, false],
  ['Mismatch loss', (w) => w.mismatch_loss_db, (v) => `${fmt(v, 2)} dB`, false],
  ['Blind range', (w) => w.blind_range_m, metres, false],
  ['Unambiguous range', (w) => w.unambiguous_range_m, metres, true],
  ['Unambiguous velocity', (w) => w.unambiguous_velocity_mps, (v) => `±${format('speed', v, 1)}`, true],
  ['Doppler resolution', (w) => w.doppler_resolution_hz, (v) => eng(v, 'Hz')],
  ['Velocity resolution', (w) => w.velocity_resolution_mps, (v) => format('speed', v, 2)],
];

// keepUnits joins each number to the unit after it with a no-break space,
// so that a card's line never ends between them ("peak shift -35.66" with
// "m" alone on the next line).
const keepUnits = (text) => text.replace(/(\d) (?=[^\s\d·])/g, '$1\u00a0');

// What the two SNR-like numbers on a card mean.
const SNRHelp = 'SNR: the target’s expected peak after pulse compression, in dB above the noise.';
const MarginHelp = 'Margin: how far its SNR at the cell is above what the required Pd needs against noise alone, in dB; negative means it is too weak even alone.';
const ThresholdHelp = 'Over threshold: how far the expected peak clears the detector’s threshold at its range (raised by other echoes in the training cells), in dB. Clearing it is not enough: a fluctuating target needs more to be seen on most looks.';
const IntegratedHelp = 'Integrated: the SNR after adding up all pulses of the train coherently.';
const PdHelp = 'Pd: how often the target is seen at the detector’s false-alarm rate, for its fluctuation model, in this scene. “Alone” is its Pd with the other targets removed (its own range sidelobes still in its training cells), shown when it differs. The status compares Pd with the required Pd.';
const GhostPdHelp = 'Ghost Pd: how often its folded echo is seen at the apparent range, where it looks like a target that is not there: a false target, not a detection at its true range.';
const DetectionRangeHelp = 'Detection range: where its SNR at the cell would fall to what the required Pd needs, by the R⁴ law from its present range, its RCS and everything else kept (it may lie outside the receive window).';
const NumbersHelp = 'Pd is how often a target is seen; it is detected when Pd reaches the required Pd. SNR is the peak above noise after compression; margin is the SNR over what the required Pd needs (below 0: too weak even alone).';

// selected: the id of the target selected in the editor, whose card is
// marked; a click on a card selects its target (main.js).
export function renderFigures(root, report, reference, computeMs, selected) {
  if (!report) {
    root.replaceChildren(h('p', { class: 'muted' }, 'Waiting for the first result…'));
    return;
  }
  const w = report.waveform || {};
  const rw = reference ? reference.waveform || {} : null;
  const rows = waveformRows.filter(([, get]) => get(w) !== undefined || (rw && get(rw) !== undefined));
  const table = h('table', { class: 'figs' },
    h('thead', {}, h('tr', {}, h('th', {}, 'Figure'), h('th', {}, 'Now'), rw ? h('th', {}, 'Pinned') : null)),
    h('tbody', {}, rows.map(([label, get, f, better]) => {
      const now = get(w);
      const ref = rw ? get(rw) : undefined;
      let cls = '';
      if (rw && better !== undefined && Number.isFinite(now) && Number.isFinite(ref) && Math.abs(now - ref) > 1e-9) {
        cls = (now > ref) === better ? 'better' : 'worse';
      }
      return h('tr', {}, h('th', {}, label), h('td', { class: cls }, f(now)), rw ? h('td', {}, f(ref)) : null);
    })));

  const refTargets = new Map(((reference && reference.targets) || []).map((t) => [t.id, t]));
  const cards = (report.targets || []).map((t) => {
    const rt = refTargets.get(t.id);
    return h('li', { class: `tcard st-${t.status}${t.id === selected ? ' sel' : ''}`, dataset: { target: t.id },
      title: 'Click to select this target in the editor' },
      h('div', { class: 'tcard-head' },
        h('span', { class: `dot st-${t.status}` }),
        h('b', {}, t.id),
        h('span', { class: 'status', title: statusHelp(t.status) }, statusLabel(t.status)),
        rt && rt.status !== t.status ? h('span', { class: 'was' }, `pinned: ${statusLabel(rt.status)}`) : null),
      h('div', { class: 'tcard-nums' },
        t.pd !== undefined ? h('b', { class: 'pd', title: t.status === 'folded' ? GhostPdHelp : PdHelp }, `${t.status === 'folded' ? 'ghost Pd' : 'Pd'} ${pdText(t.pd)}`
          + (t.pd_alone !== undefined && pdText(t.pd_alone) !== pdText(t.pd) ? ` (alone ${pdText(t.pd_alone)})` : '')) : null,
        h('span', { title: SNRHelp }, `SNR ${fmt(t.snr_db)} dB`),
        t.margin_db !== undefined ? h('span', { title: MarginHelp }, `margin ${t.margin_db >= 0 ? '+' : ''}${fmt(t.margin_db)} dB`) : null,
        t.detection_range_m !== undefined ? h('span', { class: 'detrange', title: DetectionRangeHelp }, `detection range ${wholeMetres(t.detection_range_m)}`) : null,
        t.threshold_margin_db !== undefined ? h('span', { title: ThresholdHelp }, `over threshold ${t.threshold_margin_db >= 0 ? '+' : ''}${fmt(t.threshold_margin_db)} dB`) : null,
        t.snr_integrated_db !== undefined ? h('span', { title: IntegratedHelp }, `integrated ${fmt(t.snr_integrated_db)} dB`) : null,
        t.masked_by ? h('span', {}, t.masked_by === t.id ? 'masked by its own sidelobes' : `masked by ${t.masked_by}`) : null,
        t.doppler_loss_db > 0.05 ? h('span', {}, `Doppler loss ${fmt(t.doppler_loss_db)} dB`) : null,
        t.doppler_hz ? h('span', { class: 'dop', title: 'Doppler shift of the echo, and the shift of its compressed peak in range (range–Doppler coupling)' },
          keepUnits(`Doppler ${t.doppler_hz > 0 ? '+' : ''}${eng(t.doppler_hz, 'Hz')} · peak shift ${t.range_shift_m > 0 ? '+' : ''}${format('range', t.range_shift_m, 2)}`)) : null,
        ...clutterNums(t)),
      h('div', { class: 'reason' }, restate(t.reason || '')));
  });

  // Updated in place (morph.js): only what changed reaches the document.
  morphChildren(root, [
    h('h3', {}, 'Waveform'),
    table,
    h('h3', {}, 'Targets'),
    report.integration
      ? h('p', { class: 'integration-note small', title: 'receiver.integration: noncoherent' },
        `Non-coherent integration of ${report.integration.pulses} pulses: ${report.integration.note}.`)
      : null,
    (report.targets || []).length ? h('p', { class: 'muted small nums-help' }, NumbersHelp) : null,
    cards.length ? h('ul', { class: 'tcards' }, cards) : h('p', { class: 'muted' }, 'No targets in the scene.'),
    clutterSummary(report),
    (report.warnings || []).length
      ? h('div', { class: 'warnings' }, h('h3', {}, 'Warnings'), h('ul', {}, report.warnings.map((m) => h('li', {}, restate(m)))))
      : null,
    computeMs !== undefined ? h('p', { class: 'muted small' }, `computed in ${fmt(computeMs, 1)} ms`) : null,
  ].filter(Boolean));
}
