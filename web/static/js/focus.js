// Focus: one action zooms the profile (and the echo, which shares its
// range axis) onto a chosen target and the target that masks it. Chosen
// from the profile's "Focus…" list, or by double-clicking a marker.

// focusSpan returns the range span [a, b] (m) that shows target t and its
// masker (if any) with room around them: half the distance between them
// or twelve main-lobe widths, whichever is larger, each side; null when t
// has no finite range.
//
// A target beyond the unambiguous range is shown where its folded echo
// appears (as its marker is: server/framecharts.go appendMarkers), and
// focused there; the focus went to its true range, past the window's end
// (long-pulse-blind's airliner at 210 km: 145.7 … 150 km, an empty stretch).
export function focusSpan(report, id) {
  const targets = (report && report.targets) || [];
  const t = targets.find((x) => x.id === id);
  if (!t || !Number.isFinite(t.range_m)) return null;
  const ru = (report.waveform && report.waveform.unambiguous_range_m) || 0;
  const shown = (x) => (ru > 0 && x.range_m >= ru ? x.range_m - Math.floor(x.range_m / ru) * ru : x.range_m);
  const m = t.masked_by ? targets.find((x) => x.id === t.masked_by) : null;
  const rs = [shown(t)];
  if (m && Number.isFinite(m.range_m)) rs.push(shown(m));
  const lo = Math.min(...rs);
  const hi = Math.max(...rs);
  const lobe = (report.waveform && report.waveform.mainlobe_3db_m) || 0;
  const pad = Math.max((hi - lo) / 2, 12 * lobe, 1);
  return [lo - pad, hi + pad];
}

export function initFocus({ plots, frame }) {
  const sel = document.getElementById('focus-select');
  const chart = plots.charts.profile;
  const focus = (id) => {
    const span = focusSpan(frame() && frame().report, id);
    if (!span) return false;
    chart.dispatchAction({ type: 'dataZoom', dataZoomIndex: 0, startValue: span[0], endValue: span[1] });
    chart.dispatchAction({ type: 'dataZoom', dataZoomIndex: 1, startValue: span[0], endValue: span[1] });
    return true;
  };
  sel.addEventListener('change', () => {
    if (sel.value === '*') chart.dispatchAction({ type: 'dataZoom', start: 0, end: 100 });
    else if (sel.value) focus(sel.value);
    sel.value = '';
  });
  // The list follows the report's targets; a masked one names its masker.
  let last = '';
  const refresh = () => {
    const targets = ((frame() && frame().report) || {}).targets || [];
    const key = JSON.stringify(targets.map((t) => [t.id, t.masked_by || '']));
    if (key === last) return;
    last = key;
    const opts = [new Option('Focus…', ''), new Option('whole window', '*')];
    // A target masked by its own sidelobes has no other target to show.
    for (const t of targets) opts.push(new Option(t.masked_by && t.masked_by !== t.id ? `${t.id} and ${t.masked_by} (masks it)` : t.id, t.id));
    sel.replaceChildren(...opts);
  };
  plots.charts.profile.getDom().addEventListener('dblclick', (ev) => {
    const r = ev.currentTarget.getBoundingClientRect();
    const m = plots.hit(ev.clientX - r.left, ev.clientY - r.top);
    if (m && focus(m.id)) ev.stopPropagation();
  }, true);
  return { focus, refresh };
}
