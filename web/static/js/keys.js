// Keyboard: undo and redo over whole-scenario snapshots, and arrow keys
// that nudge the selected target (↑/↓ its level by 1 dB, ←/→ its range by
// one resolution cell; Shift for a tenth).
//
// Arrows nudge only when the user is clearly nudging: while the profile
// plot has the focus (a click, drag or wheel on it gives it the focus) or,
// for ↑/↓, while a level field of the target table has it. Anywhere else
// (a button, the figures panel, the page itself) they scroll and move as
// usual.

export function initKeys({ store, editor, lastFrame, profile }) {
  profile.tabIndex = 0;
  profile.setAttribute('aria-label', 'Compressed range profile: ↑/↓ nudge the selected target’s level, ←/→ its range');
  const focusPlot = () => {
    if (document.activeElement !== profile) profile.focus({ preventScroll: true });
  };
  // Capture phase: the plot's own handlers stop these events on a marker.
  profile.addEventListener('pointerdown', focusPlot, true);
  profile.addEventListener('wheel', focusPlot, { capture: true, passive: true });

  addEventListener('keydown', (ev) => {
    const mod = ev.ctrlKey || ev.metaKey;
    const key = ev.key.toLowerCase();
    if (mod && !ev.altKey && (key === 'z' || key === 'y')) {
      ev.preventDefault();
      if (document.activeElement && document.activeElement.blur) document.activeElement.blur();
      if (key === 'y' || ev.shiftKey) store.redo();
      else store.undo();
      return;
    }
    if (mod || ev.altKey) return;
    const el = document.activeElement;
    const onPlot = el === profile;
    const onLevel = !!(el && el.tagName === 'INPUT' && el.dataset.level !== undefined);
    const vertical = ev.key === 'ArrowUp' || ev.key === 'ArrowDown';
    const horizontal = ev.key === 'ArrowLeft' || ev.key === 'ArrowRight';
    if (!(onPlot && (vertical || horizontal)) && !(onLevel && vertical)) return;
    const i = onLevel ? Number(el.dataset.level) : editor.selected;
    const t = (store.scenario && store.scenario.targets || [])[i];
    if (!t) return;
    const step = ev.shiftKey ? 0.1 : 1;
    ev.preventDefault();
    if (vertical) {
      editor.nudge(i, ev.key === 'ArrowUp' ? step : -step);
    } else {
      const f = lastFrame();
      const cell = (f && f.report && f.report.waveform && f.report.waveform.mainlobe_3db_m) || 10;
      const r = t.kind === 'point' ? t.range_m : t.range_start_m;
      editor.moveTo(t.id, r + (ev.key === 'ArrowRight' ? 1 : -1) * cell * step);
    }
  });
}
