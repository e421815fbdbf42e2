// Antenna scan (radar.scan): the scan editor in the Radar tab, and the
// scan's figures (hits per scan, dwell, scan loss, beam-shape loss) in the
// figures panel (docs/detection.md §14). A module of its own, like
// schedule.js: it keeps its block in step with the scenario and reads
// each frame's report.

import { $, $$, h } from './dom.js';

const { store, onFrame } = window.__pw;
const root = $('#ed-scan');
const localErrors = new Map(); // path → message for text that is not a number

const planes = [['azimuth', 'Azimuth'], ['elevation', 'Elevation']];
const patterns = [['gaussian', 'Gaussian'], ['sinc', 'sinc']];
const num = (v, d) => (typeof v === 'number' && Number.isFinite(v) ? v.toFixed(d) : '—');
const secs = (s) => (!Number.isFinite(s) ? '—' : s >= 1 ? `${num(s, 2)} s` : s >= 1e-3 ? `${num(s * 1e3, 1)} ms` : `${num(s * 1e6, 0)} µs`);

function scan(s) {
  return s && s.radar && s.radar.scan;
}

let shape = '';

function render(s) {
  if (!s) return;
  const want = scan(s) ? 'on' : 'off';
  if (want !== shape) {
    shape = want;
    build(s);
    return;
  }
  const sc = scan(s);
  if (!sc) return;
  const rate = $('[data-scan="radar.scan.rate_deg_s"]', root);
  if (rate && rate !== document.activeElement && !localErrors.has(rate.dataset.scan)) rate.value = sc.rate_deg_s === undefined ? '' : String(sc.rate_deg_s);
  for (const el of $$('select[data-scan]', root)) {
    const key = el.dataset.scan.split('.').pop();
    const v = sc[key] ?? el.dataset.def;
    if (el.value !== v) el.value = v;
  }
}

function select(label, path, options, value, def, title) {
  const id = `f-${path.replace(/[^\w]/g, '_')}`;
  return h('div', { class: 'field' },
    h('label', { for: id }, label),
    h('select', { id, title, dataset: { scan: path, def } }, options.map(([v, l]) => h('option', { value: v, selected: v === (value ?? def) }, l))),
    h('div', { class: 'err', dataset: { errFor: path } }));
}

function build(s) {
  const sc = scan(s);
  root.replaceChildren();
  root.append(h('div', { class: 'scan-head' },
    h('h3', {}, 'Antenna scan'),
    h('p', { class: 'scan-note' }, sc
      ? 'The beam sweeps past the targets: N = θ·PRF/θ̇ pulses fall inside its 3-dB width. A pulse train’s CPI, centred on the beam’s peak, sees the target through the two-way pattern (the scan loss), and surface clutter is weighted by the pattern.'
      : 'The beam stares at the targets. Let it scan to see the hits per scan, the scan loss and the pattern-weighted clutter.')));
  if (!sc) {
    root.append(h('button', { type: 'button', class: 'scan-add', dataset: { act: 'start' } }, '+ Scan the beam'));
    root.append(h('div', { class: 'err', dataset: { errFor: 'radar.scan' } }));
    return;
  }
  const id = 'f-radar_scan_rate_deg_s';
  root.append(h('div', { class: 'grid' },
    h('div', { class: 'field' },
      h('label', { for: id }, 'Scan rate'),
      h('div', { class: 'input-unit' },
        h('input', { id, type: 'text', inputmode: 'decimal', autocomplete: 'off', spellcheck: 'false', value: sc.rate_deg_s === undefined ? '' : String(sc.rate_deg_s), dataset: { scan: 'radar.scan.rate_deg_s' } }),
        h('span', { class: 'unit' }, '°/s')),
      h('div', { class: 'err', dataset: { errFor: 'radar.scan.rate_deg_s' } })),
    select('Scans in', 'radar.scan.plane', planes, sc.plane, 'azimuth', 'The plane of the scan: its beamwidth (az or el above) sets the dwell'),
    select('Beam pattern', 'radar.scan.pattern', patterns, sc.pattern, 'gaussian', 'One-way voltage pattern: Gaussian exp(−2 ln2·u²), or sinc, a uniformly lit aperture with its sidelobes')));
  root.append(h('p', { class: 'scan-live', dataset: { live: '' } }, ''));
  root.append(h('div', { class: 'scan-foot' },
    h('button', { type: 'button', class: 'scan-stop', dataset: { act: 'stop' }, title: 'Remove radar.scan: a staring beam, as before' }, '✕ Stare instead')));
  root.append(h('div', { class: 'err', dataset: { errFor: 'radar.scan' } }));
  live(lastReport);
}

root.addEventListener('click', (ev) => {
  const b = ev.target.closest('button[data-act]');
  if (!b) return;
  if (b.dataset.act === 'start') {
    store.update((s) => {
      s.radar = s.radar || {};
      s.radar.scan = { rate_deg_s: 36 }; // 6 rpm
    }, 'scan:start');
  } else if (b.dataset.act === 'stop') {
    localErrors.clear();
    store.update((s) => { delete s.radar.scan; }, 'scan:stop');
  }
  store.seal();
});

root.addEventListener('change', (ev) => {
  const el = ev.target;
  if (el.tagName !== 'SELECT' || !el.dataset.scan) return;
  const key = el.dataset.scan.split('.').pop();
  const v = el.value;
  store.update((s) => {
    if (v === el.dataset.def) delete s.radar.scan[key];
    else s.radar.scan[key] = v;
  }, `scan:${key}`);
  store.seal();
});

root.addEventListener('input', (ev) => {
  const el = ev.target;
  const path = el.dataset && el.dataset.scan;
  if (!path || el.tagName !== 'INPUT') return;
  const text = el.value.trim();
  const v = Number(text);
  const msg = text === '' ? 'required: the scan rate in °/s (“✕ Stare instead” removes the scan)' : !Number.isFinite(v) ? `“${text}” is not a number` : '';
  const slot = $(`[data-err-for="${CSS.escape(path)}"]`, root);
  if (msg) {
    localErrors.set(path, msg);
    if (slot) slot.textContent = msg;
    el.setAttribute('aria-invalid', 'true');
    return; // the scene keeps its last good value
  }
  localErrors.delete(path);
  if (slot) slot.textContent = '';
  el.removeAttribute('aria-invalid');
  store.update((s) => { s.radar.scan.rate_deg_s = v; }, `scan:${path}`);
});
root.addEventListener('focusout', () => store.seal());

store.onChange((s) => render(s));
if (store.scenario) render(store.scenario);

// --- the figures ---

let lastReport = null;

// The line under the editor's fields: what the rate gives.
function live(rep) {
  const el = $('[data-live]', root);
  if (!el) return;
  const sr = rep && rep.scan;
  if (!sr) {
    el.textContent = '';
    return;
  }
  const parts = [`${num(sr.hits_per_scan, 1)} hits per scan`, `dwell ${secs(sr.dwell_s)}`];
  if (sr.scan_period_s !== undefined) parts.push(`one turn ${secs(sr.scan_period_s)}`);
  parts.push(sr.cpi_loss_db !== undefined ? `CPI scan loss ${num(sr.cpi_loss_db, 2)} dB` : 'one pulse at the peak: no scan loss');
  el.textContent = parts.join(' · ');
  el.classList.toggle('warn', !!sr.cpi_exceeds_dwell);
  el.title = sr.cpi_exceeds_dwell ? 'The CPI lasts longer than the dwell: its outer pulses fall beyond the half-power points.' : '';
}

const story = h('section', { class: 'scan-story', 'aria-label': 'Antenna scan', hidden: true });
$('.figures .fig-head').before(story);

function renderStory(rep) {
  const sr = rep && rep.scan;
  story.hidden = !sr;
  if (!sr) return;
  const lines = [
    h('li', { class: 'scan-hits', title: 'N = θ·PRF/θ̇: the pulses a point target gets while it is inside the 3-dB beam (the dwell θ/θ̇).' },
      `${num(sr.hits_per_scan, 1)} hits per scan · dwell ${secs(sr.dwell_s)}`, sr.scan_period_s !== undefined ? ` · one turn ${secs(sr.scan_period_s)}` : ''),
  ];
  if (sr.cpi_loss_db !== undefined) {
    lines.push(h('li', { class: sr.cpi_exceeds_dwell ? 'scan-cpi warn' : 'scan-cpi', title: 'The CPI’s pulses centred on the beam’s peak, weighted by the two-way pattern and the Doppler window: the loss of the peak on the range–Doppler map.' },
      `CPI ${secs(sr.cpi_s)} spans ${num(sr.cpi_beamwidths, 2)} beamwidths: scan loss ${num(sr.cpi_loss_db, 2)} dB centred`,
      sr.cpi_loss_offset_db !== undefined ? `, ${num(sr.cpi_loss_offset_db, 2)} dB half a CPI off` : '', sr.cpi_exceeds_dwell ? ' — longer than the dwell' : ''));
  } else {
    lines.push(h('li', { class: 'scan-cpi' }, 'One pulse at the beam’s peak: no scan loss'));
  }
  lines.push(h('li', { class: 'scan-bsl', title: 'Integrating the hits per scan spread over the 3-dB beamwidth, against as many at the peak (about 1.83 / 1.67 dB for a densely sampled Gaussian beam).' },
    `Beam-shape loss of the dwell ${num(sr.beam_shape_loss_coherent_db, 2)} dB coherent, ${num(sr.beam_shape_loss_noncoherent_db, 2)} dB noncoherent`));
  lines.push(h('li', { class: 'scan-clutter', title: 'Surface clutter is weighted by the two-way pattern: its patch is ∫f⁴ wide instead of θaz.' },
    `Clutter patch × ${num(sr.clutter_width_factor, 3)} (${num(10 * Math.log10(sr.clutter_width_factor), 2)} dB)`));
  const hit = (rep.targets || []).filter((t) => t.scan_loss_db !== undefined);
  if (hit.length) {
    lines.push(h('li', { class: 'scan-targets' }, 'On the map: ', hit.map((t, i) => {
      const decides = /scan loss decides/.test(t.reason || '');
      return h('span', { class: decides ? 'decides' : '', title: t.reason }, `${i ? ', ' : ''}${t.id} ${num(t.scan_loss_db, 2)} dB${decides ? ' (decides)' : ''}`);
    })));
  }
  story.replaceChildren(h('h3', {}, `Antenna scan · ${sr.pattern} beam in ${sr.plane}`), h('ul', {}, lines));
}

// The page clears every field message when a frame is accepted; a scan
// field whose text is not a number keeps its own.
function reshowLocal() {
  for (const [path, msg] of localErrors) {
    const slot = $(`[data-err-for="${CSS.escape(path)}"]`, root);
    if (slot && !slot.textContent) slot.textContent = msg;
  }
}

onFrame((f) => {
  queueMicrotask(reshowLocal);
  lastReport = f.report || null;
  live(lastReport);
  renderStory(lastReport);
});
