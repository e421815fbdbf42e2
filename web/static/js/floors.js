// The "Floors" tab of the lower right plot: the dynamic-range view of one
// target (docs/detection.md §15) — its response, phase-noise skirt and
// I/Q image, the ADC's and DC floors, the rest of the scene, thermal
// noise and the threshold against range, and each other target marked in
// the colour of the floor that hides it. The option is built on the
// server (server/floorcharts.go) and arrives in the frames while this tab
// shows (a floors message); hidden, it costs nothing. The target is the
// one chosen in the target table, or the strongest until one is chosen.

import * as echarts from '../vendor/echarts/echarts.esm.min.js';
import { $, $$ } from './dom.js';

const { store, editor, plots, session, onFrame } = window.__pw;
const pane = $('.pane[data-pane="floors"]');
const el = $('#chart-floors');
const note = $('#floors-note');
const rowPick = $('#floors-row');

plots.charts.floors = echarts.init(el, null, { renderer: 'canvas' });
plots.els.floors = el;
plots.ro.observe(el);
plots.decorators.floors = () => plots.charts.floors.setOption({ tooltip: { formatter: tip } });

let chosen = ''; // the target chosen in the table; '' until then: the strongest

const shown = () => pane.classList.contains('on');

function ask() {
  session.sendFloors(shown() ? { target: chosen, row: rowPick.value } : null);
  note.textContent = chosen
    ? `Floors of ${chosen}, the selected target`
    : 'Floors of the strongest target · pick another in the target table, on its card or its marker';
  note.title = note.textContent;
}

// Tabs of the lower right plot: ask while this one shows, stop otherwise.
for (const b of $$('#panel-right .plot-head [data-show]')) {
  b.addEventListener('click', () => {
    ask();
    if (shown()) requestAnimationFrame(() => plots.charts.floors.resize());
  });
}

editor.selectHooks.push((i) => {
  const t = ((store.scenario && store.scenario.targets) || [])[i];
  chosen = t ? t.id : '';
  if (shown()) ask();
});

// A new scene: back to its strongest target.
store.onChange((s, cause) => {
  if (cause !== 'load' && cause !== 'link') return;
  chosen = '';
  rowPick.value = '';
  if (shown()) ask();
});

// Pulse trains: the map row the curves follow, through a target's peak
// ("auto": the engine's choice, the first target the selected one masks).
rowPick.addEventListener('change', () => { if (shown()) ask(); });
onFrame((f) => {
  const report = f && f.report;
  const train = !!(report && report.waveform && report.waveform.doppler_resolution_hz !== undefined);
  rowPick.closest('label').hidden = !train;
  const ids = ((report && report.targets) || []).map((t) => t.id);
  const have = [...rowPick.options].slice(1).map((o) => o.value);
  if (ids.join('\u0000') !== have.join('\u0000')) {
    const keep = rowPick.value;
    rowPick.replaceChildren(new Option('auto', ''), ...ids.map((id) => new Option(id, id)));
    rowPick.value = ids.includes(keep) ? keep : '';
  }
});

const plain = (v) => String(v).replace(/[{}|]/g, '');

// The axis tooltip: each curve's level at the range, and the marks' words.
function tip(params) {
  const ps = [params].flat();
  if (!ps.length) return '';
  const lines = [];
  const x = ps[0].axisValue ?? (ps[0].value && ps[0].value[0]);
  if (Number.isFinite(x)) lines.push(`${x.toFixed(0)} m`);
  for (const p of ps) {
    if (p.data && p.data.tip) lines.push(plain(p.data.tip));
    else if (Array.isArray(p.value) && Number.isFinite(p.value[1]) && p.value[1] > -100) lines.push(`${plain(p.seriesName)}: ${p.value[1].toFixed(1)} dB`);
  }
  return lines.join('\n');
}
