// The page's scenario and its undo history. The scenario is the object sent
// to the server; every change goes through update(), which records a
// whole-scenario snapshot for undo and tells the listeners.

const MaxHistory = 200;
const CoalesceMs = 800; // repeated edits of one field within this merge into one undo step
const NudgeCoalesceMs = 2000; // nudges of one level (wheel, arrow keys) within this form one step

export class Store {
  constructor() {
    this.scenario = null;
    this.undoStack = []; // JSON snapshots before each step
    this.redoStack = [];
    this.lastKey = null;
    this.lastTime = 0;
    this.listeners = new Set();
    this.version = 0; // counts changes, so that a frame can be matched to the scene it shows
  }

  onChange(fn) {
    this.listeners.add(fn);
  }

  emit(cause) {
    this.version++;
    for (const fn of this.listeners) fn(this.scenario, cause);
  }

  // Replace the whole scenario (a demo, a link, an import). With record,
  // the previous one goes on the undo stack.
  load(scenario, { record = true, cause = 'load' } = {}) {
    if (record && this.scenario) this.push(null);
    this.scenario = structuredClone(scenario);
    this.emit(cause);
  }

  // Apply mutate(scenario) as one edit. Edits with the same key in quick
  // succession (typing in one field, nudging one level) form one undo step;
  // a drag ("drag:…" keys) is one step however slowly it goes, until seal().
  update(mutate, key = null) {
    const now = performance.now();
    const span = key && key.startsWith('nudge:') ? NudgeCoalesceMs : CoalesceMs;
    const same = key && key === this.lastKey && (now - this.lastTime < span || key.startsWith('drag:'));
    if (!same) this.push(key);
    this.lastKey = key;
    this.lastTime = now;
    mutate(this.scenario);
    this.emit('edit');
  }

  push(key) {
    this.undoStack.push(JSON.stringify(this.scenario));
    if (this.undoStack.length > MaxHistory) this.undoStack.shift();
    this.redoStack.length = 0;
    this.lastKey = key;
  }

  // End a coalescing run, so the next edit starts a new undo step.
  seal() {
    this.lastKey = null;
  }

  undo() {
    if (!this.undoStack.length) return false;
    this.redoStack.push(JSON.stringify(this.scenario));
    this.scenario = JSON.parse(this.undoStack.pop());
    this.lastKey = null;
    this.emit('undo');
    return true;
  }

  redo() {
    if (!this.redoStack.length) return false;
    this.undoStack.push(JSON.stringify(this.scenario));
    this.scenario = JSON.parse(this.redoStack.pop());
    this.lastKey = null;
    this.emit('redo');
    return true;
  }
}
