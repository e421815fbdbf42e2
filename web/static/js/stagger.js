// Staggered PRI trains (pri_stagger_s): the velocity response chart under
// the schedule editor in the Radar tab, and one line naming each
// stagger's first true blind speed and deepest dip. The chart's option
// comes from the server (server/velcharts.go); the stagger fields are in
// the schedule editor (schedule.js).

import * as echarts from '../vendor/echarts/echarts.esm.min.js';
import { $, h } from './dom.js';

const { plots, onFrame } = window.__pw;

const chartEl = h('div', { class: 'chart vel-chart', id: 'chart-velocity' });
const line = h('p', { class: 'vel-sum', id: 'vel-sum' });
const box = h('section', { class: 'vel-ed', id: 'ed-velocity', 'aria-label': 'Velocity response', hidden: true },
  h('h3', {}, 'Velocity response of the stagger'),
  h('p', { class: 'sched-note' }, 'The best Doppler filter’s gain against range rate, re its mean. A stagger is blind together only at λ/(2Δ) (solid mark); the dashed marks are where each PRI alone would be blind.'),
  line, chartEl);
$('#ed-schedule').after(box);

plots.charts.velocity = echarts.init(chartEl, null, { renderer: 'canvas' });
plots.els.velocity = chartEl;
plots.ro.observe(chartEl);

const num = (v, d) => (Number.isFinite(v) ? v.toFixed(d) : '—');
const us = (s) => String(Number((s * 1e6).toPrecision(6)));

// The staggered CPIs of a report: {k, pri, blind, mean, dip, dipAt}.
function staggers(report) {
  const out = [];
  const st = report && report.stagger;
  if (st) out.push({ k: 1, pri: st.pri_s, blind: st.first_blind_speed_mps, mean: st.mean_pri_blind_speed_mps, dip: st.deepest_dip_db, dipAt: st.deepest_dip_mps });
  const sr = report && report.schedule;
  if (sr) {
    sr.cpis.forEach((c, i) => {
      if (i > 0 && c.pri_stagger_s) out.push({ k: i + 1, pri: c.pri_stagger_s, blind: c.blind_speed_mps });
    });
  }
  return out;
}

onFrame((f) => {
  const list = staggers(f.report);
  box.hidden = !list.length;
  if (!list.length) return;
  line.textContent = list.map((s) => {
    let t = `CPI ${s.k}: ${s.pri.map(us).join(' / ')} µs, first blind speed ${num(s.blind, 1)} m/s`;
    if (s.mean) t += ` (${num(s.blind / s.mean, 2)} × the mean PRI’s ${num(s.mean, 1)} m/s)`;
    if (s.dip !== undefined) t += `, deepest dip ${num(s.dip, 1)} dB at ${num(s.dipAt, 0)} m/s`;
    return t;
  }).join(' · ');
  plots.charts.velocity.resize();
});
