// The "Pd curves" tab of the lower right plot: Pd against SNR and against
// range for one target, fetched from POST /api/v1/coverage when the tab
// shows and again when the scene changes while it shows. The chart option
// is built on the server (server/pdcharts.go); this module only picks the
// target, asks, and draws, with the range axis and the note's ranges in
// the units the user chose.

import { axisUnits, format, niceTicks, onUnits, unit } from './units.js';

const WaitMs = 250; // after the last change, so a drag does not queue requests

export function initPdCurves({ plots, scenario }) {
  const chart = plots.charts.pdcurves;
  const select = document.getElementById('pd-target');
  const note = document.getElementById('pd-note');
  const pane = document.querySelector('.pane[data-pane="pdcurves"]');
  let asked = ''; // the scene and target last asked for
  let timer = 0;
  let ctrl = null;
  let last = null; // the coverage last drawn, for the note in other units

  const shown = () => pane.classList.contains('on');

  // Point targets of the report, in order; keep the chosen one when it
  // is still there.
  function fillTargets(report) {
    const ids = ((report && report.targets) || []).filter((t) => t.pd !== undefined || t.snr_required_db !== undefined).map((t) => t.id);
    const all = ((scenario() && scenario().targets) || []).filter((t) => (t.kind || 'point') === 'point').map((t) => t.id);
    const list = all.length ? all : ids;
    const keep = select.value;
    if (select.options.length !== list.length || [...select.options].some((o, i) => o.value !== list[i])) {
      select.replaceChildren(...list.map((id) => new Option(id, id)));
    }
    if (list.includes(keep)) select.value = keep;
    else if (list.length) select.value = ids[0] && list.includes(ids[0]) ? ids[0] : list[0];
  }

  async function ask() {
    timer = 0;
    const s = scenario();
    const id = select.value;
    if (!s || !id) {
      chart.clear();
      note.textContent = 'No point target in the scene.';
      return;
    }
    const key = JSON.stringify(s) + '\u0000' + id;
    if (key === asked) return;
    asked = key;
    if (ctrl) ctrl.abort();
    ctrl = new AbortController();
    note.textContent = 'computing…';
    try {
      const res = await fetch(`/api/v1/coverage?target=${encodeURIComponent(id)}`, {
        method: 'POST', body: JSON.stringify(s), headers: { 'Content-Type': 'application/json' }, signal: ctrl.signal,
      });
      const body = await res.json();
      if (!res.ok) throw new Error(body.error || `HTTP ${res.status}`);
      const option = axisUnits(body.option);
      // Ranges in metres ("7000") are wide: drop tick labels that would touch.
      for (const ax of [option.xAxis || []].flat()) ax.axisLabel = { ...(ax.axisLabel || {}), hideOverlap: true };
      chart.setOption(option, { notMerge: true });
      niceTicks(chart);
      last = body.coverage;
      writeNote();
    } catch (e) {
      if (e.name === 'AbortError') return;
      asked = '';
      last = null;
      note.textContent = `No curves: ${e.message}`;
    }
  }

  function writeNote() {
    note.textContent = summary(last);
    note.title = summary(last, true);
  }
  // The chart's axis follows the units with every other chart
  // (Plots.applyUnits); the note is written again here.
  onUnits(() => { if (last) writeNote(); });

  function later() {
    clearTimeout(timer);
    timer = setTimeout(ask, WaitMs);
  }

  select.addEventListener('change', () => { if (shown()) ask(); });
  document.querySelector('.plot-head [data-show="pdcurves"]').addEventListener('click', () => {
    // The pane has just become visible: size the chart to it first.
    requestAnimationFrame(() => { chart.resize(); ask(); });
  });

  return {
    // A new frame: refresh the target list, and the curves if they show.
    refresh(frame) {
      fillTargets(frame && frame.report);
      if (shown()) later();
    },
  };
}

// The note beside the tab's target list (up to two lines in the narrow
// pane): the SNR the target's test sees, the SNR the required Pd needs,
// its detection range and the coverage of the range curve, ranges in the
// user's units. With long set, the sentence its tooltip shows.
export function summary(c, long = false) {
  const parts = [];
  if (c.snr_db !== undefined && c.snr_required_db !== undefined) {
    parts.push(long
      ? `${c.target}: ${c.snr_db.toFixed(1)} dB SNR at its cell; Pd ${c.pd_required} needs ${c.snr_required_db.toFixed(1)} dB against noise alone`
      : `${c.snr_db.toFixed(1)} dB at its cell, ${c.snr_required_db.toFixed(1)} dB needed for Pd ${c.pd_required}`);
  } else {
    parts.push(`${c.target}: no Pd series applies here`);
  }
  if (c.detection_range_m !== undefined) {
    parts.push(long
      ? `detection range for its RCS ${range(c.detection_range_m)} (where its SNR falls to the needed value, R⁴ law)`
      : `detection range ${range(c.detection_range_m)}`);
  }
  if (c.coverage_m !== undefined) {
    parts.push(long
      ? `coverage ${range(c.coverage_m)} (where Pd alone falls to ${c.pd_required} on the range curve)`
      : `coverage ${range(c.coverage_m)}`);
  }
  return parts.join(' · ');
}

// range is a range in the user's unit; in metres, km from 10 km up.
function range(v) {
  return unit('range') === 'm' && v >= 10000 ? `${(v / 1000).toFixed(2)} km` : format('range', v, 0);
}
