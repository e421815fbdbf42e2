// The scene editor: radar, pulse and receive forms and the target table.
// Every input carries the JSON path of its field (data-path), so that the
// server's validation messages land beside the field they name.

import { $$, getPath, h, setPath } from './dom.js';
import {
  convertTarget, detectorFields, isPhaseCode, sciDisplay, kindShort, kindTitle, detectorKinds, fluctuations, fromDisplay, levelKey,
  newWaveform, radarFields, targetKinds, toDisplay, uniqueId, waveformKinds, windowKinds,
} from './schema.js';
import { describeFields, fieldName, pdText, statusHelp, statusLabel } from './words.js';
import { clutterFields, levelOf } from './clutter.js';
import { fieldText, notValue, parse, qtyOf, rangeError, restate, unit, unitLabel, units } from './units.js';
import { frontEndBlock } from './frontend.js';

// setField writes a form field into the scenario. A detector field of a
// scene that left the detector to its default writes the default kind
// too, since the form shows it.
function setField(s, path, v) {
  if (path.startsWith('receiver.detector.') && !(s.receiver && s.receiver.detector && s.receiver.detector.kind)) {
    setPath(s, 'receiver.detector.kind', 'ca_cfar');
  }
  setPath(s, path, v);
}

export class Editor {
  // roots: {targets, radar, pulse, receive, scene} elements.
  constructor(roots, store) {
    this.roots = roots;
    this.store = store;
    this.selected = 0; // index of the selected target
    this.selectHooks = []; // fn(i) called when the user selects target i
    this.dragOrigin = null; // {id, r0, from} of the drag in progress (dragTo)
    this.status = new Map(); // target id → report entry
    this.reportTargets = []; // the report's entries, in scene order
    this.shape = '';
    // Fields whose text is not a value (typed "12x"): path → message. The
    // scene keeps the field's last good value; the message stays until the
    // text is fixed or replaced, whatever frames arrive meanwhile.
    this.localErrors = new Map();
    this.onLocalErrors = () => {};
    for (const root of Object.values(roots)) {
      root.addEventListener('input', (ev) => this.onInput(ev));
      root.addEventListener('change', (ev) => this.onChange(ev));
      root.addEventListener('focusout', () => this.store.seal());
    }
    roots.targets.addEventListener('click', (ev) => this.onTargetClick(ev));
    roots.targets.addEventListener('focusin', (ev) => {
      const row = ev.target.closest('[data-row]');
      if (row) this.select(Number(row.dataset.row));
    });
    roots.targets.addEventListener('wheel', (ev) => this.onWheel(ev), { passive: false });
  }

  // --- input handling ---

  value(el) {
    const type = el.dataset.type;
    if (type === 'notes') return el.value.trim() === '' ? undefined : el.value;
    if (type === 'text' || type === 'select') {
      if (el.dataset.int) return Number(el.value);
      return el.value === '' && el.dataset.optional ? undefined : el.value;
    }
    if (type === 'phases') {
      const parts = el.value.split(/[\s,;]+/).filter(Boolean);
      if (!parts.length) return undefined;
      const nums = parts.map((p) => fromDisplay(p, 1, false));
      return nums.some((n) => Number.isNaN(n)) ? NaN : nums;
    }
    if (el.dataset.qty) return parse(el.dataset.qty, el.value);
    return fromDisplay(el.value, Number(el.dataset.scale || 1), type === 'int');
  }

  onInput(ev) {
    const el = ev.target;
    const path = el.dataset && el.dataset.path;
    if (!path || el.tagName === 'SELECT') return;
    const v = this.value(el);
    if (typeof v === 'number' && Number.isNaN(v) || Array.isArray(v) && v.some(Number.isNaN)) {
      this.setLocalError(path, el.dataset.type === 'phases'
        ? `“${el.value.trim()}” is not a list of numbers (degrees, separated by commas or spaces)`
        : el.dataset.qty ? notValue(el.dataset.qty, el.value) : `“${el.value.trim()}” is not a number`);
      return;
    }
    this.setLocalError(path, '');
    this.store.update((s) => {
      setField(s, path, v);
      // A phase code is given by phases or by a +/− string, not both: the
      // one being typed replaces the other.
      if (v !== undefined && path === 'waveform.phases_deg') delete s.waveform.binary;
      if (v !== undefined && path === 'waveform.binary') delete s.waveform.phases_deg;
    }, path);
  }

  onChange(ev) {
    const el = ev.target;
    if (el.tagName !== 'SELECT') return;
    const action = el.dataset.action;
    const v = el.value;
    if (action === 'waveform-kind') {
      this.store.update((s) => {
        s.waveform = newWaveform(v, s.waveform);
        // A mismatched filter needs a phase code: back to matched otherwise.
        if (!isPhaseCode(v) && s.receiver && (s.receiver.filter === 'least_squares' || s.receiver.filter === 'minimax')) {
          delete s.receiver.filter;
          delete s.receiver.filter_length_factor;
        }
      });
    } else if (action && action.startsWith('window-kind:')) {
      const path = action.slice('window-kind:'.length);
      this.store.update((s) => setPath(s, path, { kind: v }));
    } else if (action === 'detector-kind') {
      this.store.update((s) => {
        s.receiver = s.receiver || {};
        const old = s.receiver.detector || {};
        const d = { kind: v };
        if (old.pfa !== undefined) d.pfa = old.pfa;
        if (old.pd_required !== undefined) d.pd_required = old.pd_required;
        s.receiver.detector = d;
      });
    } else if (action === 'target-kind') {
      const i = Number(el.dataset.index);
      this.store.update((s) => { s.targets[i] = convertTarget(s.targets[i], v); });
    } else if (el.dataset.path) {
      this.store.update((s) => setField(s, el.dataset.path, this.value(el)));
    }
  }

  onTargetClick(ev) {
    const btn = ev.target.closest('[data-act]');
    const row = ev.target.closest('[data-row]');
    if (btn) {
      const i = Number(btn.dataset.index);
      const act = btn.dataset.act;
      if (act === 'add') this.addTarget();
      else if (act === 'dup') this.duplicate(i);
      else if (act === 'del') this.remove(i);
      return;
    }
    if (row) this.select(Number(row.dataset.row));
  }

  onWheel(ev) {
    const el = ev.target.closest('[data-level]');
    if (!el) return;
    ev.preventDefault();
    const i = Number(el.dataset.level);
    this.select(i);
    this.nudge(i, (ev.deltaY < 0 ? 1 : -1) * (ev.shiftKey ? 0.1 : 1));
  }

  addTarget() {
    this.store.update((s) => {
      s.targets = s.targets || [];
      const last = s.targets[s.targets.length - 1];
      const r = last ? (last.range_m ?? last.range_stop_m ?? 1000) + 200 : ((s.radar && s.radar.window_start_m) || 0) + 2000;
      s.targets.push({ id: uniqueId(s.targets, 'target'), kind: 'point', range_m: r, rcs_dbsm: 10 });
      this.selected = s.targets.length - 1;
    });
  }

  duplicate(i) {
    this.store.update((s) => {
      const t = structuredClone(s.targets[i]);
      t.id = uniqueId(s.targets, `${t.id}-2`);
      if (t.kind === 'point') t.range_m += 100;
      s.targets.splice(i + 1, 0, t);
      this.selected = i + 1;
    });
  }

  remove(i) {
    this.store.update((s) => {
      s.targets.splice(i, 1);
      this.selected = Math.max(0, Math.min(this.selected, s.targets.length - 1));
    });
  }

  // Select target i: mark its row and show its detail form, leaving the
  // table (and any input being typed in) alone.
  select(i) {
    for (const fn of this.selectHooks) fn(i); // floors.js: a choice, even of the row already selected
    if (i === this.selected) return;
    this.selected = i;
    for (const tr of $$('tr[data-row]', this.roots.targets)) tr.classList.toggle('sel', Number(tr.dataset.row) === i);
    const detail = this.roots.targets.querySelector('.detail-slot');
    if (detail) detail.replaceChildren(this.targetDetail(this.store.scenario));
    this.shape = this.shapeOf(this.store.scenario);
  }

  selectId(id) {
    const i = (this.store.scenario.targets || []).findIndex((t) => t.id === id);
    if (i >= 0) this.select(i);
  }

  // Nudge the level (RCS, RCS per metre or reflectivity) of target i.
  nudge(i, dB) {
    const t = (this.store.scenario.targets || [])[i];
    if (!t) return;
    const key = levelKey(t.kind, t);
    if (key === 'sea_state') dB = Math.sign(dB); // whole sea states
    this.store.update((s) => {
      const v = (s.targets[i][key] ?? 0) + dB;
      s.targets[i][key] = Math.round(v * 10) / 10;
    }, `nudge:${i}`);
  }

  // Move target id to range r (drag on the profile plot).
  // A drag on the plot from range r0 to r moves the target by r − r0
  // from where the drag found it (dragOrigin, cleared when the drag
  // ends): a folded target stays folded (its marker is its ghost, a
  // pulse repetition nearer), an extended one keeps its edges where its
  // peak was grabbed. With r0 null it goes to r (moveTo). It went to the
  // pointer's range: a small drag of long-pulse-blind's folded airliner
  // at 210 km put it at 71 km.
  dragTo(id, r, r0) {
    if (r0 === null || r0 === undefined) {
      this.moveTo(id, r);
      return;
    }
    const t = (this.store.scenario.targets || []).find((x) => x.id === id);
    if (!t) return;
    const o = this.dragOrigin;
    if (!o || o.id !== id || o.r0 !== r0) this.dragOrigin = { id, r0, from: t.kind === 'point' ? t.range_m : t.range_start_m };
    this.moveTo(id, this.dragOrigin.from + (r - r0));
  }

  moveTo(id, r) {
    const i = (this.store.scenario.targets || []).findIndex((t) => t.id === id);
    if (i < 0) return;
    r = Math.max(0, Math.round(r * 10) / 10);
    this.store.update((s) => {
      const t = s.targets[i];
      if (t.kind === 'point') {
        t.range_m = r;
      } else {
        const w = t.range_stop_m - t.range_start_m;
        t.range_start_m = r;
        t.range_stop_m = Math.round((r + w) * 10) / 10;
      }
    }, `drag:${id}`);
  }

  // --- rendering ---

  // Bring the forms in line with the scenario. Forms are rebuilt when their
  // shape changes (a kind, the number of targets); otherwise only values
  // change, and the field being typed in is left alone.
  render(s) {
    const t = s.targets || [];
    if (this.selected >= t.length) this.selected = Math.max(0, t.length - 1);
    const shape = this.shapeOf(s);
    if (shape !== this.shape) {
      this.shape = shape;
      if (this.localErrors.size) {
        this.localErrors.clear();
        this.onLocalErrors();
      }
      this.renderScene(s);
      this.renderRadar(s);
      this.renderPulse(s);
      this.renderReceive(s);
      this.renderTargets(s, true);
      return;
    }
    this.renderTargets(s, false);
    for (const [name, root] of Object.entries(this.roots)) if (name !== 'targets') this.syncValues(root, s);
  }

  shapeOf(s) {
    const t = s.targets || [];
    const rx = s.receiver || {};
    return JSON.stringify([s.waveform && s.waveform.kind, rx.window && rx.window.kind, (rx.detector && rx.detector.kind) || 'ca_cfar',
      rx.doppler_window && rx.doppler_window.kind, rx.filter, t.map((x) => `${x.kind}:${levelKey(x.kind, x)}`), this.selected]);
  }

  syncValues(root, s) {
    for (const el of $$('[data-path]', root)) {
      if (el === document.activeElement) continue;
      const v = getPath(s, el.dataset.path);
      if (el.tagName === 'SELECT') {
        const want = String(v ?? el.dataset.def ?? '');
        if (want && el.value !== want) el.value = want;
        continue;
      }
      const text = el.dataset.type === 'phases' ? (v || []).join(', ')
        : el.dataset.qty ? fieldText(el.dataset.qty, v, Number(el.dataset.digits) || 12) : el.dataset.sci ? sciDisplay(v) : toDisplay(v, Number(el.dataset.scale || 1));
      if (el.value !== text) {
        el.value = text;
        if (this.localErrors.has(el.dataset.path)) this.setLocalError(el.dataset.path, '');
      }
    }
  }

  // A labelled input for field fd of the object at base.
  field(s, base, fd) {
    if (!fd.qty && qtyOf(fd.key, fd.unit)) fd = { ...fd, qty: qtyOf(fd.key, fd.unit) };
    if (fd.qty) fd = { ...fd, unit: unitLabel(fd.qty), hint: fd.hint || (fd.def !== undefined ? fieldText(fd.qty, fd.def) : '') };
    const path = base ? `${base}.${fd.key}` : fd.key;
    const v = getPath(s, path);
    const hint = fd.hint || (fd.def !== undefined ? toDisplay(fd.def, fd.scale) : '');
    let input;
    if (fd.type === 'select') {
      // An option is a value, or [value, label] when the value is an
      // identifier ("least_squares") that people should not have to read.
      input = h('select', { dataset: { path, type: 'select', int: fd.int ? '1' : '', def: fd.def !== undefined ? String(fd.def) : undefined } },
        fd.options.map((o) => {
          const [val, label] = Array.isArray(o) ? o : [o, String(o)];
          return h('option', { value: String(val), selected: String(v ?? fd.def) === String(val) }, label);
        }));
    } else if (fd.type === 'notes') {
      input = h('textarea', { rows: 4, dataset: { path, type: 'notes' }, placeholder: fd.hint || '', value: v || '', spellcheck: 'true' });
    } else if (fd.type === 'phases') {
      input = h('textarea', { rows: 2, dataset: { path, type: 'phases' }, placeholder: fd.hint || '0, 180, 90 …', value: (v || []).join(', ') });
    } else {
      input = h('input', {
        type: 'text', inputmode: fd.type === 'text' ? 'text' : 'decimal', autocomplete: 'off', spellcheck: 'false',
        dataset: { path, type: fd.type, scale: String(fd.scale), optional: '1' },
        placeholder: fd.sci && fd.def !== undefined ? sciDisplay(fd.def) : hint, value: fd.sci ? sciDisplay(v) : toDisplay(v, fd.scale),
      });
      if (fd.sci) input.dataset.sci = '1';
      if (fd.qty) {
        input.dataset.qty = fd.qty;
        input.value = fieldText(fd.qty, v);
      }
    }
    input.id = `f-${path.replace(/[^\w]/g, '_')}`;
    return h('div', { class: fd.wide ? 'field wide' : 'field' },
      h('label', { for: input.id }, fd.label),
      h('div', { class: 'input-unit' }, input, fd.unit ? h('span', { class: 'unit' }, fd.unit) : null),
      h('div', { class: 'err', dataset: { errFor: path } }));
  }

  kindSelect(label, action, kinds, current, path) {
    const id = `k-${action.replace(/[^\w]/g, '_')}`;
    return h('div', { class: 'field wide' },
      h('label', { for: id }, label),
      h('select', { id, dataset: { action, errPath: path } },
        Object.entries(kinds).map(([k, d]) => h('option', { value: k, selected: k === current }, d.label))),
      h('div', { class: 'err', dataset: { errFor: path } }));
  }

  renderScene(s) {
    this.roots.scene.replaceChildren(
      this.field(s, '', { key: 'name', label: 'Scene name', unit: '', scale: 1, type: 'text', wide: true }),
      this.field(s, '', { key: 'seed', label: 'Noise seed', unit: '', scale: 1, type: 'int', def: 1 }),
      this.field(s, '', { key: 'notes', label: 'Notes (travel with the scenario and its link)', unit: '', scale: 1, type: 'notes', wide: true,
        hint: 'What this scene shows, what to try…' }),
    );
  }

  renderRadar(s) {
    this.roots.radar.replaceChildren(
      h('div', { class: 'err block', dataset: { errFor: 'radar' } }),
      h('div', { class: 'grid' }, radarFields.map((fd) => this.field(s, 'radar', fd))));
  }

  renderPulse(s) {
    const w = s.waveform || {};
    const kind = waveformKinds[w.kind] ? w.kind : 'lfm';
    this.roots.pulse.replaceChildren(
      this.kindSelect('Waveform', 'waveform-kind', waveformKinds, kind, 'waveform.kind'),
      h('div', { class: 'err block', dataset: { errFor: 'waveform' } }),
      h('div', { class: 'grid' }, waveformKinds[kind].fields.map((fd) => this.field(s, 'waveform', fd))));
  }

  windowBlock(s, title, path, def) {
    const w = getPath(s, path) || { kind: def };
    const kind = windowKinds[w.kind] ? w.kind : def;
    return h('div', { class: 'sub' },
      this.kindSelect(title, `window-kind:${path}`, windowKinds, kind, `${path}.kind`),
      h('div', { class: 'grid' }, windowKinds[kind].fields.map((fd) => this.field(s, path, fd))));
  }

  renderReceive(s) {
    const rx = s.receiver || {};
    const det = rx.detector || { kind: 'ca_cfar' };
    const dkind = detectorKinds[det.kind] ? det.kind : 'ca_cfar';
    // Mismatched filters apply to phase codes only: others are not offered.
    const code = isPhaseCode(s.waveform && s.waveform.kind);
    const filterFd = {
      key: 'filter', label: 'Compression filter', type: 'select', def: 'matched', scale: 1, wide: code,
      options: [['matched', 'Matched'], ...(code || rx.filter === 'least_squares' ? [['least_squares', 'Mismatched, least-squares']] : []),
        ...(code || rx.filter === 'minimax' ? [['minimax', 'Mismatched, minimax (lowest peak sidelobe)']] : [])],
    };
    const filterBlock = [this.field(s, 'receiver', filterFd)];
    if (rx.filter === 'least_squares' || rx.filter === 'minimax') {
      filterBlock.push(this.field(s, 'receiver', { key: 'filter_length_factor', label: 'Filter length', unit: '× code', scale: 1, type: 'int', def: 3 }));
    }
    // How the pulses of a train are combined (receiver.integration,
    // scenario format 3): the Doppler filter bank, or the sum of the
    // detected pulses per range gate (no range–Doppler map).
    filterBlock.push(this.field(s, 'receiver', {
      key: 'integration', label: 'Pulse integration (pulses > 1)', type: 'select', def: 'coherent', scale: 1, wide: true,
      options: [['coherent', 'Coherent: Doppler filter, range–Doppler map'], ['noncoherent', 'Non-coherent: sum of the detected pulses']],
    }));
    this.roots.receive.replaceChildren(
      h('div', { class: 'grid' }, filterBlock),
      this.windowBlock(s, 'Range weighting', 'receiver.window', 'none'),
      h('div', { class: 'sub' },
        this.kindSelect('Detector', 'detector-kind', detectorKinds, dkind, 'receiver.detector.kind'),
        h('div', { class: 'grid' }, detectorKinds[dkind].fields.map((k) => this.field(s, 'receiver.detector', detectorFields[k])))),
      this.windowBlock(s, 'Pulse-to-pulse weighting (pulses > 1)', 'receiver.doppler_window', 'hann'),
      frontEndBlock(this, s));
  }

  targetRow(t, i) {
    const lk = levelKey(t.kind, t);
    const lv = levelOf(t);
    const num = (key, qty = '') => h('input', {
      type: 'text', inputmode: 'decimal', autocomplete: 'off', value: qty ? fieldText(qty, t[key], 6) : toDisplay(t[key], 1),
      // The table's narrow cells show 6 significant digits (7 with a sign,
      // as 3.401728 nmi or -6.173333 m/s, were cut); the form below shows all.
      dataset: { path: `targets[${i}].${key}`, type: 'num', scale: '1', optional: '1', qty: qty || undefined, digits: qty ? '6' : undefined },
      'aria-label': `${t.id} ${key}`,
    });
    const rep = this.reportTargets.length === (this.store.scenario.targets || []).length ? this.reportTargets[i] : this.status.get(t.id);
    const st = rep ? rep.status : '';
    const level = num(lk);
    level.dataset.level = String(i);
    level.title = lk === 'sea_state' ? `${lv.name}, ${lv.unit}: wheel, or ↑/↓ while this field has the focus, steps it by one`
      : `${lv.name} in ${lv.unit}: wheel, or ↑/↓ while this field has the focus, nudges it by 1 dB (Shift: 0.1 dB)`;
    level.setAttribute('aria-label', `${t.id} ${lv.name} (${lv.unit})`);
    const range = num(t.kind === 'point' ? 'range_m' : 'range_start_m', 'range');
    range.setAttribute('aria-label', `${t.id} ${t.kind === 'point' ? 'range' : 'near edge'} (${unitLabel('range')})`);
    range.title = t.kind === 'point' ? `Range, ${unitLabel('range')}` : `Near edge of the target, ${unitLabel('range')} (the far edge is in the form below)`;
    const rate = num('range_rate_mps', 'rate');
    rate.setAttribute('aria-label', `${t.id} range rate (${unitLabel('rate')})`);
    rate.title = `Range rate, ${unitLabel('rate')}`;
    return h('tr', { class: i === this.selected ? 'sel' : '', dataset: { row: String(i) } },
      h('td', {}, h('span', { class: `dot st-${st || 'none'}`, title: st ? statusHelp(st) : 'not evaluated' })),
      h('td', {}, h('input', { type: 'text', class: 'id', value: t.id, autocomplete: 'off', spellcheck: 'false', title: t.id,
        dataset: { path: `targets[${i}].id`, type: 'text' }, 'aria-label': 'target id' })),
      h('td', {}, h('select', { class: 'kind', dataset: { action: 'target-kind', index: String(i), path: `targets[${i}].kind`, type: 'kind' }, 'aria-label': `${t.id} kind`, title: kindTitle[t.kind] },
        targetKinds.map((k) => h('option', { value: k, selected: k === t.kind, title: kindTitle[k] }, kindShort[k])))),
      h('td', {}, range),
      h('td', { class: this.mixedKinds ? 'with-unit' : '' }, level, this.mixedKinds ? h('span', { class: 'cell-unit' }, lv.unit) : null),
      h('td', {}, rate),
      h('td', { class: 'acts' },
        h('button', { type: 'button', class: 'icon', title: 'Duplicate', dataset: { act: 'dup', index: String(i) } }, '+'),
        h('button', { type: 'button', class: 'icon', title: 'Delete', dataset: { act: 'del', index: String(i) } }, '×')));
  }

  // The detail form of the selected target: every field of its kind.
  targetDetail(s) {
    const i = this.selected;
    const t = (s.targets || [])[i];
    if (!t) return h('p', { class: 'muted' }, 'No targets. Add one to start.');
    const base = `targets[${i}]`;
    const fds = t.kind === 'point'
      ? [{ key: 'range_m', label: 'Range', qty: 'range' }, { key: 'rcs_dbsm', label: 'RCS', unit: 'dBsm' },
        { key: 'range_rate_mps', label: 'Range rate', qty: 'rate', def: 0 },
        { key: 'fluctuation', label: 'Fluctuation', type: 'select', options: fluctuations, def: 'none' },
        { key: 'height_m', label: 'Height', qty: 'height', def: 0 }]
      : [{ key: 'range_start_m', label: 'Near edge', qty: 'range' }, { key: 'range_stop_m', label: 'Far edge', qty: 'range' },
        { key: levelKey(t.kind, t), label: levelOf(t).short === 'Refl.' ? 'Reflectivity' : levelOf(t).name, unit: levelOf(t).unit },
        { key: 'range_rate_mps', label: 'Range rate', qty: 'rate', def: 0 },
        { key: 'velocity_spread_mps', label: 'Velocity spread (rms)', qty: 'speed', def: 0 }];
    return h('div', { class: 'detail' },
      h('div', { class: 'detail-head' }, `Target “${t.id}” · ${kindTitle[t.kind]}`),
      h('div', { class: 'err block', dataset: { errFor: base } }),
      h('div', { class: 'grid' }, fds.map((fd) => this.field(s, base, { scale: 1, type: 'num', ...fd })), clutterFields(this, s, i, t)));
  }

  renderTargets(s, full) {
    const root = this.roots.targets;
    const targets = s.targets || [];
    if (!full) {
      // Same shape: only values change. Rebuilding the table would lose
      // the field being typed in and costs a layout on every drag step.
      this.syncValues(root, s);
      this.updateDots();
      const t = targets[this.selected];
      const head = root.querySelector('.detail-head');
      if (t && head) head.textContent = `Target “${t.id}” · ${kindTitle[t.kind]}`;
      for (const input of $$('input.id', root)) input.title = input.value;
      return;
    }
    const kinds = [...new Set(targets.map((t) => levelOf(t).unit))];
    this.mixedKinds = kinds.length > 1;
    const one = kinds.length === 1 ? levelOf(targets[0]) : null;
    const head = (name, unit, title) => h('th', { title }, h('span', { class: 'th-name' }, name), h('span', { class: 'th-unit' }, unit));
    root.replaceChildren(
      h('table', { class: 'targets' },
        h('thead', {}, h('tr', {},
          h('th', {}, ''), head('Target', '', 'Target id'), head('Kind', '', 'point, extended (ext.) or volume (vol.)'),
          head('Range', `(${unitLabel('range')})`, `Range of a point target, near edge of an extended or volume target, in ${unitLabel('range')}`),
          one ? head(one.short, `(${one.unit})`, `${one.name} in ${one.unit}`)
            : head('Level', '(per row)', 'RCS of a point target (dBsm), RCS per metre of an extended one (dBsm/m), reflectivity of a volume (dBZ)'),
          head(units().rate === 'closing' ? 'Closing' : 'Rate', `(${unit('rate')})`, `Range rate in ${unit('rate')}, positive when ${units().rate === 'closing' ? 'closing (the range shrinks)' : 'opening (the range grows)'}`), h('th', {}, ''))),
        h('tbody', {}, targets.map((t, i) => this.targetRow(t, i)))),
      h('div', { class: 'row-actions' },
        h('button', { type: 'button', dataset: { act: 'add' } }, '+ Add target'),
        h('span', { class: 'muted small' }, 'Drag a marker on the profile; the wheel over it, or ↑/↓ in a level field, nudges its level.')),
      h('div', { class: 'err block', dataset: { errFor: 'targets' } }),
      h('div', { class: 'detail-slot' }, this.targetDetail(s)));
  }

  // Report statuses for the dots of the target table.
  setReport(report) {
    this.reportTargets = (report && report.targets) || [];
    this.status = new Map(this.reportTargets.map((t) => [t.id, t]));
    this.updateDots();
  }

  // A row's status is the report's entry at the same index (ids can be
  // duplicated or renamed while typing); when the plotted scene has a
  // different number of targets, entries are matched by id instead.
  updateDots() {
    const targets = (this.store.scenario && this.store.scenario.targets) || [];
    const byIndex = this.reportTargets.length === targets.length;
    $$('tr[data-row]', this.roots.targets).forEach((tr) => {
      const i = Number(tr.dataset.row);
      const t = targets[i];
      const rep = t && (byIndex ? this.reportTargets[i] : this.status.get(t.id));
      const dot = tr.querySelector('.dot');
      if (!dot) return;
      const st = rep ? rep.status : 'none';
      dot.className = `dot st-${st}`;
      dot.title = rep ? `${statusLabel(st)}${rep.pd !== undefined ? ` (Pd ${pdText(rep.pd)})` : ''}: ${restate(rep.reason)}` : 'not evaluated';
    });
  }

  // --- validation messages ---

  setLocalError(path, msg) {
    const had = this.localErrors.has(path);
    if (msg) this.localErrors.set(path, msg);
    else this.localErrors.delete(path);
    this.showLocalError(path, msg);
    if (had !== !!msg || msg) this.onLocalErrors();
  }

  showLocalError(path, msg) {
    for (const el of $$(`[data-err-for="${CSS.escape(path)}"]`)) el.textContent = msg;
    for (const el of $$(`[data-path="${CSS.escape(path)}"]`)) {
      if (msg) el.setAttribute('aria-invalid', 'true');
      else el.removeAttribute('aria-invalid');
    }
  }

  // The first field whose text is not a value, as a sentence, or null.
  localProblem() {
    for (const [path, msg] of this.localErrors) return `${fieldName(path, this.store.scenario)}: ${msg}`;
    return null;
  }

  // Show the server's field errors beside their fields; a path with no
  // field of its own goes to its nearest parent that has a message slot.
  // Returns the messages that found no place.
  showErrors(fields) {
    this.clearErrors();
    const orphans = [];
    for (const fe of fields || []) {
      let path = fe.path || '';
      let slots = [];
      while (path) {
        slots = $$(`[data-err-for="${CSS.escape(path)}"]`);
        if (slots.length) break;
        // Up one level; a top-level name ("version", an unknown field) has
        // no parent, and its message goes to the page's own list.
        const up = path.replace(/(\.[^.[\]]*|\[\d+\])$/, '');
        path = up === path ? '' : up;
      }
      if (!slots.length) {
        orphans.push(describeFields([fe], this.store.scenario));
        continue;
      }
      const qin = path === fe.path && $$(`[data-path="${CSS.escape(fe.path)}"][data-qty]`)[0];
      const text = qin ? rangeError(qin.dataset.qty, fe.message, getPath(this.store.scenario, fe.path)) : path === fe.path ? inUnits(fe.message, slots[0]) : `${fe.path.slice(path.length).replace(/^\./, '')}: ${fe.message}`;
      for (const slot of slots) {
        slot.textContent = slot.textContent ? `${slot.textContent}; ${text}` : text;
        // Outline the slot's own input only when the message is about it:
        // a message that climbed to a parent's slot (a duplicate id shown
        // in the target's form) must not outline another field there.
        const input = path === fe.path && slot.parentElement && slot.parentElement.querySelector('input, select, textarea');
        if (input) input.setAttribute('aria-invalid', 'true');
      }
      for (const input of $$(`[data-path="${CSS.escape(fe.path)}"]`)) input.setAttribute('aria-invalid', 'true');
    }
    return orphans;
  }

  clearErrors() {
    for (const el of $$('[data-err-for]')) el.textContent = '';
    for (const el of $$('[aria-invalid]')) el.removeAttribute('aria-invalid');
    for (const [path, msg] of this.localErrors) this.showLocalError(path, msg);
  }

  // The first panel holding an error, so the page can show that tab.
  errorPanel() {
    for (const [name, root] of Object.entries(this.roots)) {
      if ($$('[data-err-for]', root).some((e) => e.textContent)) return name;
    }
    return null;
  }
}

// The server states range errors in SI ("4e+11 is above the maximum
// 3e+11"); beside a field shown in another unit (GHz), restate the numbers
// of such a message in that unit ("400 GHz is above the maximum 300 GHz").
const rangeMessage = /^(-?[\d.]+(?:e[+-]?\d+)?) (is above the maximum|is below the minimum|must be above) (-?[\d.]+(?:e[+-]?\d+)?)(.*)$/;
const physicalUnit = /^(m|m\/s|m\/s rms|dB|dBi|dBsm|dBsm\/m|dBZ|W|Hz|kHz|MHz|GHz|s|ms|µs|ns|°)$/;
function inUnits(msg, slot) {
  const field = slot.parentElement;
  const input = field && field.querySelector('input[data-scale]');
  const unit = field && field.querySelector('.unit');
  const scale = input ? Number(input.dataset.scale) : 1;
  const m = rangeMessage.exec(msg);
  if (!m || !unit || !(scale > 0) || !physicalUnit.test(unit.textContent)) return msg;
  const show = (x) => {
    const v = Number(x) / scale;
    if (unit.textContent === 'm' && Math.abs(v) >= 100000) return `${Number((v / 1000).toPrecision(6))} km`;
    return `${Number(v.toPrecision(6))} ${unit.textContent}`;
  };
  const rest = m[4].replace(/(above|at most|range|…) (-?[\d.]+(?:e[+-]?\d+)?)/g, (_, w, x) => `${w} ${show(x)}`);
  return `${show(m[1])} ${m[2]} ${show(m[3])}${rest}`;
}
