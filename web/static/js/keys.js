// Keyboard: undo and redo over whole-scenario snapshots, and arrow keys
// that nudge the selected target (↑/↓ its level by 1 dB, ←/→ its range by
// one resolution cell; Shift for a tenth).

const typing = (el) => el && (el.tagName === 'TEXTAREA' || el.tagName === 'SELECT' || (el.tagName === 'INPUT' && !el.dataset.level));

export function initKeys({ store, editor, lastFrame }) {
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
    if (mod || ev.altKey || typing(document.activeElement)) return;
    const i = editor.selected;
    const t = (store.scenario && store.scenario.targets || [])[i];
    if (!t) return;
    const step = ev.shiftKey ? 0.1 : 1;
    if (ev.key === 'ArrowUp' || ev.key === 'ArrowDown') {
      ev.preventDefault();
      editor.nudge(i, ev.key === 'ArrowUp' ? step : -step);
    } else if (ev.key === 'ArrowLeft' || ev.key === 'ArrowRight') {
      ev.preventDefault();
      const f = lastFrame();
      const cell = (f && f.report && f.report.waveform && f.report.waveform.mainlobe_3db_m) || 10;
      const r = t.kind === 'point' ? t.range_m : t.range_start_m;
      editor.moveTo(t.id, r + (ev.key === 'ArrowRight' ? 1 : -1) * cell * step);
    }
  });
}
