// PRF schedules (radar.schedule): the schedule editor in the Radar tab,
// and the Blind zones and CPI maps tabs of the lower left plot. The
// charts' options come from the server (server/schedcharts.go); this
// module makes their containers, registers them with the page's plots and
// adds their tooltips (the page's CSP allows no functions in options).

import * as echarts from '../vendor/echarts/echarts.esm.min.js';
import { $, $$, h } from './dom.js';
import { format, onUnits, signed, toUser, unit } from './units.js';

const { store, plots, session, onFrame } = window.__pw;
const MaxCPIs = 16; // scenarios.MaxCPIs: the radar's own CPI and 15 more
const root = $('#ed-schedule');
const mapsPane = $('#cpimaps');
const localErrors = new Map(); // path → message for text that is not a number

const plain = (v) => String(v).replace(/[{}]/g, '');
const num = (v, d) => (Number.isFinite(v) ? v.toFixed(d) : '—');
// Ranges and speeds of the verdicts in the user's units (units.js), a
// range with d decimals (in km when the unit is metres).
const far = (m, d) => (unit('range') === 'm' ? `${num(m / 1000, d)} km` : `${num(toUser('range', m), d)} ${unit('range')}`);
const wrap = (text, width = 56) => {
  const lines = [];
  let line = '';
  for (const w of plain(text).split(/\s+/)) {
    if (line && line.length + 1 + w.length > width) {
      lines.push(line);
      line = w;
    } else line = line ? `${line} ${w}` : w;
  }
  if (line) lines.push(line);
  return lines.join('\n');
};
// Seconds shown in µs, as the Radar form shows the PRI.
const us = (s) => (Number.isFinite(s) ? String(Number((s * 1e6).toPrecision(6))) : '');
// A staggered train's PRIs (pri_stagger_s) in µs, "100, 125".
const staggerText = (v) => (Array.isArray(v) ? v.map(us).join(', ') : '');
// The object a stagger path edits: the radar, or CPI i of the schedule.
const staggerOwner = (s, path) => {
  const m = /cpis\[(\d+)\]\.pri_stagger_s$/.exec(path);
  return m ? s.radar.schedule.cpis[Number(m[1])] : s.radar;
};

// --- the schedule editor ---

let shape = '';

function schedule(s) {
  return s && s.radar && s.radar.schedule;
}

function field(label, path, value, unit, attrs = {}) {
  const id = `f-${path.replace(/[^\w]/g, '_')}`;
  const input = h('input', { id, type: 'text', inputmode: 'decimal', autocomplete: 'off', spellcheck: 'false', value, dataset: { sched: path }, ...attrs });
  return h('div', { class: 'field' },
    h('label', { for: id }, label),
    h('div', { class: 'input-unit' }, input, unit ? h('span', { class: 'unit' }, unit) : null),
    h('div', { class: 'err', dataset: { errFor: path } }));
}

function render(s) {
  if (!s) return;
  const sc = schedule(s);
  const r = s.radar || {};
  const n = sc ? 1 + (sc.cpis || []).length : 1;
  const want = sc ? `on:${n}` : 'off';
  if (want !== shape) {
    shape = want;
    build(s);
    return;
  }
  // Same structure: refresh the values of the fields not being edited.
  for (const el of $$('input[data-sched]', root)) {
    if (el.dataset.sched.endsWith('.pri_s')) el.disabled = staggered(s, el.dataset.sched);
    if (el === document.activeElement || localErrors.has(el.dataset.sched)) continue;
    el.value = display(s, el.dataset.sched);
  }
  const own = $('[data-own]', root);
  if (own) own.textContent = ownText(r);
}

function ownText(r) {
  const pri = Array.isArray(r.pri_stagger_s) ? `stagger ${staggerText(r.pri_stagger_s)} µs` : `PRI ${us(r.pri_s ?? 1e-3)} µs`;
  return `${pri} · ${r.pulses ?? 1} pulse${(r.pulses ?? 1) === 1 ? '' : 's'} (the Radar fields above)`;
}

// Whether the CPI of a PRI field has a stagger (its PRI is then the
// stagger's shortest, not edited here).
function staggered(s, path) {
  const m = /cpis\[(\d+)\]\.pri_s$/.exec(path);
  const c = m && schedule(s) && schedule(s).cpis[Number(m[1])];
  return !!(c && Array.isArray(c.pri_stagger_s));
}

function display(s, path) {
  if (path.endsWith('pri_stagger_s')) return staggerText(staggerOwner(s, path).pri_stagger_s);
  const sc = schedule(s);
  if (!sc) return '';
  if (path === 'radar.schedule.m') return String(sc.m ?? 1 + sc.cpis.length);
  const m = /cpis\[(\d+)\]\.(pri_s|pulses)$/.exec(path);
  const c = m && sc.cpis[Number(m[1])];
  if (!c) return '';
  if (m[2] === 'pri_s') return us(c.pri_s);
  return String(c.pulses ?? (s.radar.pulses ?? 1));
}

function build(s) {
  const sc = schedule(s);
  const r = s.radar || {};
  root.replaceChildren();
  const head = h('div', { class: 'sched-head' },
    h('h3', {}, 'PRF schedule'),
    h('p', { class: 'sched-note' }, sc
      ? 'Each CPI is evaluated with the same waveform and scene; a target counts as detected when M of the N CPIs detect it, and its range and range rate are unfolded across them.'
      : 'One CPI. Add CPIs at other PRIs to see past blind speeds and folded ranges (M-of-N).'));
  root.append(head);
  // The radar's own CPI may be a staggered train (radar.pri_stagger_s).
  const ownStagger = field('Stagger of CPI 1', 'radar.pri_stagger_s', display(s, 'radar.pri_stagger_s'), 'µs',
    { placeholder: 'e.g. 100, 125', title: 'PRIs the pulses use in turn, µs, separated by commas (2 to 16); empty: one PRI' });
  ownStagger.classList.add('stagger-own');
  if (!sc) {
    root.append(ownStagger);
    root.append(h('button', { type: 'button', class: 'sched-add', dataset: { act: 'start' } }, '+ Add a CPI'));
    root.append(h('div', { class: 'err', dataset: { errFor: 'radar.schedule' } }));
    return;
  }
  const rows = [h('div', { class: 'sched-row own' }, h('span', { class: 'sched-k' }, 'CPI 1'), h('span', { dataset: { own: '' } }, ownText(r))), ownStagger];
  sc.cpis.forEach((c, i) => {
    const base = `radar.schedule.cpis[${i}]`;
    rows.push(h('div', { class: 'sched-row', dataset: { row: i } },
      h('span', { class: 'sched-k' }, `CPI ${i + 2}`),
      field('PRI', `${base}.pri_s`, display(s, `${base}.pri_s`), 'µs', { disabled: staggered(s, `${base}.pri_s`) }),
      field('Pulses', `${base}.pulses`, display(s, `${base}.pulses`), '', { placeholder: String(r.pulses ?? 1) }),
      field('Stagger', `${base}.pri_stagger_s`, display(s, `${base}.pri_stagger_s`), 'µs',
        { placeholder: 'none', title: 'PRIs the pulses use in turn, µs, separated by commas (2 to 16); empty: the PRI alone' }),
      h('button', { type: 'button', class: 'icon sched-del', title: `Remove CPI ${i + 2}`, 'aria-label': `Remove CPI ${i + 2}`, dataset: { act: 'remove', i } }, '✕'),
      h('div', { class: 'err sched-row-err', dataset: { errFor: base } })));
  });
  root.append(h('div', { class: 'sched-rows' }, rows));
  const n = 1 + sc.cpis.length;
  root.append(h('div', { class: 'sched-foot' },
    h('button', { type: 'button', class: 'sched-add', dataset: { act: 'add' }, disabled: n >= MaxCPIs, title: n >= MaxCPIs ? `At most ${MaxCPIs} CPIs` : 'Add a CPI after the last' }, '+ Add CPI'),
    field(`Detect in M of ${n}`, 'radar.schedule.m', display(s, 'radar.schedule.m'), ''),
  ));
  root.append(h('div', { class: 'err', dataset: { errFor: 'radar.schedule' } }));
  root.append(h('div', { class: 'err', dataset: { errFor: 'radar.schedule.cpis' } }));
}

// A new CPI's PRI: 10 % longer than the last, on three significant digits.
function nextPRI(s) {
  const sc = schedule(s);
  const last = sc && sc.cpis.length ? sc.cpis[sc.cpis.length - 1].pri_s : (s.radar && s.radar.pri_s) || 1e-3;
  return Number((last * 1.1).toPrecision(3));
}

root.addEventListener('click', (ev) => {
  const b = ev.target.closest('button[data-act]');
  if (!b) return;
  const act = b.dataset.act;
  if (act === 'start') {
    store.update((s) => {
      s.radar = s.radar || {};
      s.radar.schedule = { cpis: [{ pri_s: nextPRI(s) }] };
    }, 'sched:start');
  } else if (act === 'add') {
    store.update((s) => {
      s.radar.schedule.cpis.push({ pri_s: nextPRI(s) });
    }, 'sched:add');
  } else if (act === 'remove') {
    const i = Number(b.dataset.i);
    for (const k of [...localErrors.keys()]) if (k.startsWith('radar.schedule.cpis')) localErrors.delete(k);
    store.update((s) => {
      s.radar.schedule.cpis.splice(i, 1);
      if (!s.radar.schedule.cpis.length) delete s.radar.schedule; // one CPI: no schedule
    }, 'sched:remove');
  }
  store.seal();
});

root.addEventListener('input', (ev) => {
  const el = ev.target;
  const path = el.dataset && el.dataset.sched;
  if (!path) return;
  const text = el.value.trim();
  if (path.endsWith('pri_stagger_s')) {
    staggerInput(el, path, text);
    return;
  }
  const isPRI = path.endsWith('.pri_s');
  const v = Number(text);
  let msg = '';
  if (text === '' && !isPRI) msg = ''; // pulses and m back to their defaults
  else if (text === '' || !Number.isFinite(v)) msg = `“${text}” is not a number`;
  else if (!isPRI && !Number.isInteger(v)) msg = `${text} is not a whole number`;
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
  store.update((s) => {
    const sc = s.radar.schedule;
    if (path === 'radar.schedule.m') {
      if (text === '') delete sc.m;
      else sc.m = v;
      return;
    }
    const [, i, key] = /cpis\[(\d+)\]\.(pri_s|pulses)$/.exec(path);
    const c = sc.cpis[Number(i)];
    if (key === 'pri_s') c.pri_s = v * 1e-6;
    else if (text === '') delete c.pulses;
    else c.pulses = v;
  }, `sched:${path}`);
});
root.addEventListener('focusout', () => store.seal());

// The shortest PRI of the CPI of a stagger field in the last frame (the
// last scene the server accepted), or 0.
function acceptedShortest(path) {
  const f = window.__pw.frame();
  const rep = f && f.report;
  if (!rep) return 0;
  const m = /cpis\[(\d+)\]\.pri_stagger_s$/.exec(path);
  if (m) {
    const c = rep.schedule && rep.schedule.cpis[Number(m[1]) + 1];
    return c ? c.pri_s : 0;
  }
  return rep.stagger ? Math.min(...rep.stagger.pri_s) : 0;
}

// A stagger field: PRIs in µs separated by commas or spaces. It sets
// pri_stagger_s and pri_s (the shortest, as the format asks); empty
// removes the stagger and keeps that PRI. Text that is not 2 to 16
// numbers stays on the field and leaves the scene as it was.
function staggerInput(el, path, text) {
  const parts = text === '' ? [] : text.split(/[\s,;/]+/).filter((p) => p !== '');
  const vals = parts.map(Number);
  let msg = '';
  const bad = parts.find((p, i) => !Number.isFinite(vals[i]));
  if (bad !== undefined) msg = `“${bad}” is not a number`;
  else if (parts.length === 1 || parts.length > 16) msg = `${parts.length} PRIs; give 2 … 16 (µs, separated by commas), or none`;
  const slot = $(`[data-err-for="${CSS.escape(path)}"]`, root);
  if (msg) {
    localErrors.set(path, msg);
    if (slot) slot.textContent = msg;
    el.setAttribute('aria-invalid', 'true');
    return;
  }
  localErrors.delete(path);
  if (slot) slot.textContent = '';
  el.removeAttribute('aria-invalid');
  store.update((s) => {
    s.radar = s.radar || {};
    const o = staggerOwner(s, path);
    if (!vals.length) {
      // Back to one PRI: the shortest of the stagger last accepted.
      const pri = acceptedShortest(path);
      if (pri) o.pri_s = pri;
      delete o.pri_stagger_s;
      return;
    }
    o.pri_stagger_s = vals.map((v) => Number((v * 1e-6).toPrecision(12)));
    o.pri_s = Math.min(...o.pri_stagger_s);
  }, `sched:${path}`);
}

store.onChange((s) => render(s));
if (store.scenario) render(store.scenario);

// --- the Blind zones and CPI maps tabs ---

const cats = {}; // chart name → {x, y} cell centres of its heat map

function register(name, el) {
  plots.charts[name] = echarts.init(el, null, { renderer: 'canvas' });
  plots.els[name] = el;
  plots.ro.observe(el);
  plots.decorators[name] = (option) => {
    const x = option.xAxis && option.xAxis[0] && option.xAxis[0].data;
    const y = option.yAxis && option.yAxis[0] && option.yAxis[0].data;
    cats[name] = { x: x || [], y: y || [] };
    plots.charts[name].setOption({ tooltip: { formatter: (p) => (name === 'blindzones' ? zoneTip(p) : mapTip(name, p)) } });
  };
}

register('blindzones', $('#chart-blindzones'));

let report = null;

function zoneTip(p) {
  const sr = report && report.schedule;
  if (!sr) return '';
  if (p.seriesId === 'zones' && Array.isArray(p.data)) {
    const c = cats.blindzones;
    const seen = p.data[2];
    const verdict = seen >= sr.m ? `${sr.m}-of-${sr.n} still detects a target here` : `${sr.m}-of-${sr.n} misses a target here`;
    return `${num(c.x[p.data[0]], 2)} km · ${num(c.y[p.data[1]], 1)} m/s\n${seen} of ${sr.n} CPIs see it (the others: eclipsed or at a blind speed)\n${verdict}`;
  }
  if (p.seriesId === 'markers' && p.data) return `${plain(p.data.id)} · ${p.data.detected ? 'detected' : 'missed'} by the schedule\n${wrap(p.data.reason || '')}`;
  return '';
}

function mapTip(name, p) {
  if (p.seriesId === 'rdmap' && Array.isArray(p.data)) {
    const c = cats[name];
    return `${num(c.x[p.data[0]], 1)} m · ${num(c.y[p.data[1]], 1)} m/s\n${num(p.data[2], 1)} dB re noise`;
  }
  if (p.seriesId === 'markers' && p.data) {
    const d = p.data;
    return `${plain(d.id)} · ${String(d.status).replace(/_/g, ' ')}\n${wrap(d.reason || '')}`;
  }
  return '';
}

// One container per CPI map, made the first time a frame carries it (the
// server sends a chart's full option once): it is never removed, only
// hidden, so later merges find the chart they apply to.
function mapBox(k) {
  const name = `cpimap${k}`;
  let box = $(`[data-cpi="${k}"]`, mapsPane);
  if (box) return box;
  box = h('figure', { class: 'cpi-map', dataset: { cpi: String(k) } }, h('figcaption', {}, `CPI ${k}`), h('div', { class: 'cpi-chart' }));
  const after = [...mapsPane.children].find((c) => Number(c.dataset.cpi) > k);
  mapsPane.insertBefore(box, after || null);
  register(name, $('.cpi-chart', box));
  return box;
}

function setTabs(on) {
  for (const b of $$('.plot-head [data-sched]')) b.hidden = !on;
  if (on) return;
  const left = document.getElementById('panel-left');
  const sel = plots.selected(left);
  if (sel === 'blindzones' || sel === 'cpimaps') plots.select(plots.train ? 'rdmap' : 'echo');
  session.showCPIMaps(false);
}

// The page clears every field message when a frame is accepted; a
// schedule field whose text is still not a number keeps its own.
function reshowLocal() {
  for (const [path, msg] of localErrors) {
    const slot = $(`[data-err-for="${CSS.escape(path)}"]`, root);
    if (slot && !slot.textContent) slot.textContent = msg;
    const input = $(`[data-sched="${CSS.escape(path)}"]`, root);
    if (input) input.setAttribute('aria-invalid', 'true');
  }
}

onFrame((f) => {
  queueMicrotask(reshowLocal); // after the page has applied the frame
  report = f.report || null;
  const sr = report && report.schedule;
  setTabs(!!sr);
  renderVerdicts(sr);
  if (!sr) return;
  const shown = new Set();
  for (const name of Object.keys(f.charts || {})) {
    const m = /^cpimap(\d+)$/.exec(name);
    if (m) mapBox(Number(m[1]));
  }
  sr.cpis.forEach((c, i) => {
    const box = $(`[data-cpi="${i + 1}"]`, mapsPane);
    if (!box || c.pulses <= 1) return;
    shown.add(box);
    const pri = c.pri_stagger_s ? `stagger ${staggerText(c.pri_stagger_s)} µs` : `PRI ${us(c.pri_s)} µs`;
    $('figcaption', box).textContent = `CPI ${i + 1} · ${pri} · ${c.pulses} pulses · blind speed ${num(c.blind_speed_mps, 1)} m/s`;
  });
  for (const box of $$('.cpi-map', mapsPane)) box.hidden = !shown.has(box);
  summary(sr);
  let hint = $('.pane-hint', mapsPane);
  if (!shown.size) {
    if (!hint) mapsPane.append((hint = h('p', { class: 'pane-hint' })));
    hint.textContent = 'No CPI of this schedule has more than one pulse: there is no range–Doppler map to show.';
  } else if (hint) hint.remove();
});

// The schedule's verdicts in the figures panel, after the scene's story:
// one line per target with its M-of-N verdict and what the unfolding
// found; the full reason on hover.
const verdicts = h('section', { class: 'sched-story', 'aria-label': 'PRF schedule', hidden: true });
$('.figures .fig-head').before(verdicts);

function renderVerdicts(sr) {
  verdicts.hidden = !sr;
  if (!sr) return;
  const head = [`PRF schedule · ${sr.n} CPIs · ${sr.m}-of-${sr.n}`];
  if (sr.unambiguous_range_m !== undefined) head.push(`unambiguous to ${far(sr.unambiguous_range_m, 1)}`);
  const clutter = new Set((report.targets || []).filter((t) => t.status === 'clutter').map((t) => t.id));
  const rows = sr.targets.filter((t) => !clutter.has(t.id)).map((t) => {
    const found = [];
    if (t.range_m !== undefined) found.push(far(t.range_m, 2));
    if (t.range_rate_mps !== undefined) found.push(signed(t.range_rate_mps, 1));
    return h('li', { class: t.detected ? 'ok' : 'miss', title: t.reason },
      h('span', { class: 'mark' }, t.detected ? '✓' : '✗'), ' ', h('b', {}, t.id),
      ` ${t.detected ? 'detected' : 'missed'}, ${t.detected_in} of ${sr.n} CPIs`,
      found.length ? ` · unfolds to ${found.join(', ')}` : '');
  });
  verdicts.replaceChildren(h('h3', {}, head.join(' · ')), h('ul', {}, rows));
}

// One line over the blind-zones map: the rule, the combined unambiguous
// range and each target's count of detecting CPIs.
function summary(sr) {
  const parts = [`${sr.n} CPIs, ${sr.m}-of-${sr.n}`];
  if (sr.unambiguous_range_m !== undefined) parts.push(`unambiguous to ${far(sr.unambiguous_range_m, 1)}`);
  if (sr.first_blind_speed_mps !== undefined) parts.push(`first common blind speed ${format('speed', sr.first_blind_speed_mps, 1)}`);
  const clutter = new Set(((report && report.targets) || []).filter((t) => t.status === 'clutter').map((t) => t.id));
  const ts = sr.targets.filter((t) => !clutter.has(t.id)).map((t) => `${t.id} ${t.detected ? '✓' : '✗'} ${t.detected_in}/${sr.n}`);
  const el = $('#sched-sum');
  el.textContent = `${parts.join(' · ')} — ${ts.join(', ')}`;
  el.title = sr.targets.map((t) => `${t.id}: ${t.reason}`).join('\n');
}

// The server sends the CPI maps while their tab shows.
for (const b of $$('#panel-left .plot-head [data-show]')) {
  b.addEventListener('click', () => session.showCPIMaps(plots.selected($('#panel-left')) === 'cpimaps'));
}

// Showing the CPI maps draws what they held back while hidden.
$('.plot-head [data-show="cpimaps"]').addEventListener('click', () => {
  const first = $$('.cpi-map', mapsPane).find((b) => !b.hidden);
  if (first) $('#panel-left button.png').dataset.png = `cpimap${first.dataset.cpi}`; // PNG saves the first CPI's map
  for (const box of $$('.cpi-map', mapsPane)) {
    const name = `cpimap${box.dataset.cpi}`;
    plots.charts[name].resize();
    plots.flush(name);
  }
});

// A change of units restates the verdicts and the summary.
onUnits(() => {
  const sr = report && report.schedule;
  renderVerdicts(sr);
  if (sr) summary(sr);
});
