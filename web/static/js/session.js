// The websocket session with the server: sends edits (at once, and at
// most one per animation frame while they stream; latest wins), the view and the pin, and hands frames
// and errors to the page. Reconnects with back-off and resends its state.

import { MsgError, MsgFrame, cellMsg, floorsMsg, pinMsg, scenarioMsg, viewMsg } from './protocol.js';

// A drag's steps come once per animation frame (about 16.7 ms apart, a
// little less when frames jitter); a gap this short keeps them from
// waiting a frame more while still merging bursts within one frame.
const SendGapMs = 10;

export class Session {
  constructor({ onFrame, onError, onStatus }) {
    this.onFrame = onFrame;
    this.onError = onError;
    this.onStatus = onStatus;
    this.nextId = 1;
    this.ws = null;
    this.scenario = null; // the newest scenario to send
    this.pinned = null;
    this.view = { range: null, width: 800, mapWidth: 0 };
    this.cell = null; // the map cell to cut through
    this.floors = null; // the Floors tab's request (floors.js), null while it is hidden
    this.dirty = { scenario: false, view: false, pin: false, cell: false, floors: false };
    this.scheduled = false;
    this.retry = 250;
    this.sent = new Map(); // edit id → performance.now() at send
    this.editedAt = new Map(); // edit id → performance.now() of the oldest edit it carries
    this.editAt = null; // when the oldest unsent edit was made
    this.tag = null;
    this.tags = new Map(); // edit id → tag given to sendScenario
    this.version = 0; // the page's version of this.scenario
    this.versions = []; // [id, version] of the scenarios sent, oldest first
    this.flushedAt = -Infinity; // performance.now() of the last flush
    this.turn = 0; // counts schedules, so that a sent one does not run again
    this.soon = false; // the scheduled flush is a microtask, not an animation frame
  }

  connect() {
    const url = `${location.protocol === 'https:' ? 'wss' : 'ws'}://${location.host}/ws`;
    const ws = new WebSocket(url);
    this.ws = ws;
    this.onStatus('connecting');
    ws.onopen = () => {
      this.retry = 250;
      this.onStatus('live');
      this.dirty = { scenario: !!this.scenario, view: true, pin: !!this.pinned, cell: !!this.cell, floors: !!this.floors };
      this.flush();
    };
    ws.onmessage = (ev) => {
      let msg;
      const t0 = performance.now();
      try {
        msg = JSON.parse(ev.data);
      } catch {
        return;
      }
      msg.arrivedAt = t0;
      msg.parseMs = performance.now() - t0;
      if (msg.type === MsgFrame) this.onFrame(msg);
      else if (msg.type === MsgError) this.onError(msg);
    };
    ws.onclose = () => {
      if (this.ws !== ws) return;
      this.onStatus('offline');
      setTimeout(() => this.connect(), this.retry);
      this.retry = Math.min(this.retry * 2, 5000);
    };
  }

  // Note that the scenario changed now (before the page re-renders its
  // editor), so that edit_ms counts from the change; see sendScenario.
  noteEdit() {
    if (this.editAt === null) this.editAt = performance.now();
  }

  // Queue the scenario; it goes out on the next animation frame. A tag
  // (e.g. 'link') is remembered with the id it goes out under; see tagOf.
  sendScenario(scenario, tag = null, version = this.version) {
    this.scenario = scenario;
    this.version = version;
    if (this.editAt === null) this.editAt = performance.now();
    this.tag = tag;
    this.dirty.scenario = true;
    this.schedule();
  }

  // The version of the scene a frame with this id shows: that of the
  // newest scenario sent up to the id that the server did not reject (a
  // rejected scenario leaves the server on the one before).
  versionAt(id, rejected) {
    for (let i = this.versions.length - 1; i >= 0; i--) {
      const [sid, v] = this.versions[i];
      if (sid <= id && !rejected.has(sid)) return v;
    }
    return null;
  }

  // The version a scenario message carried.
  versionOf(id) {
    const e = this.versions.find(([sid]) => sid === id);
    return e ? e[1] : null;
  }

  tagOf(id) {
    return this.tags.get(id) || null;
  }

  sendView(range, width, mapWidth) {
    this.view = { range, width, mapWidth };
    this.dirty.view = true;
    this.schedule();
  }

  // Whether the page shows a PRF schedule's CPI maps (schedule.js): the
  // server simulates and sends them only then.
  showCPIMaps(on) {
    if (this.cpiMaps === on) return;
    this.cpiMaps = on;
    this.dirty.view = true;
    this.schedule();
  }

  sendCell(cell) {
    this.cell = cell;
    this.dirty.cell = true;
    this.schedule();
  }

  // The Floors tab's request: {target} while it shows, null otherwise.
  sendFloors(floors) {
    if (JSON.stringify(floors) === JSON.stringify(this.floors)) return;
    this.floors = floors;
    this.dirty.floors = true;
    this.schedule();
  }

  sendPin(scenario) {
    this.pinned = scenario;
    this.dirty.pin = true;
    this.schedule();
  }

  // Messages go out at the end of the task that queued them (a
  // microtask: the changes of one task, a new scene's cell and scenario,
  // go together), without waiting for the next animation frame, which
  // cost a single edit up to 16 ms before the server saw it. Only when
  // the last message went out less than SendGapMs ago do they wait for
  // the next animation frame, so that a burst of edits (keys held, a
  // drag's steps) sends at most one scenario per frame.
  schedule() {
    if (this.scheduled) return;
    this.scheduled = true;
    const turn = ++this.turn;
    const run = () => {
      if (turn !== this.turn || !this.scheduled) return; // sent already (sendNow)
      this.scheduled = false;
      this.flush();
    };
    this.soon = performance.now() - this.flushedAt >= SendGapMs;
    if (this.soon) queueMicrotask(run);
    else requestAnimationFrame(run);
  }

  // Send what is queued for the end of this task now, before the caller
  // does slower work (the editor's forms); what waits for an animation
  // frame keeps waiting.
  sendNow() {
    if (!this.scheduled || !this.soon) return;
    this.scheduled = false;
    this.turn++;
    this.flush();
  }

  flush() {
    const ws = this.ws;
    if (!ws || ws.readyState !== WebSocket.OPEN) return;
    this.flushedAt = performance.now();
    // The view and the pin go first, so that the edit's frame uses them.
    if (this.dirty.view) {
      this.dirty.view = false;
      ws.send(viewMsg(this.nextId++, this.view.range, this.view.width, this.view.mapWidth, this.cpiMaps));
    }
    if (this.dirty.cell) {
      this.dirty.cell = false;
      ws.send(cellMsg(this.nextId++, this.cell));
    }
    if (this.dirty.floors) {
      this.dirty.floors = false;
      ws.send(floorsMsg(this.nextId++, this.floors));
    }
    if (this.dirty.pin) {
      this.dirty.pin = false;
      ws.send(pinMsg(this.nextId++, this.pinned));
    }
    if (this.dirty.scenario && this.scenario) {
      this.dirty.scenario = false;
      const id = this.nextId++;
      performance.mark(`pw-send-${id}`);
      this.sent.set(id, performance.now());
      if (this.sent.size > 500) this.sent.delete(this.sent.keys().next().value);
      this.editedAt.set(id, this.editAt === null ? performance.now() : this.editAt);
      this.editAt = null;
      if (this.editedAt.size > 500) this.editedAt.delete(this.editedAt.keys().next().value);
      this.versions.push([id, this.version]);
      if (this.versions.length > 500) this.versions.shift();
      if (this.tag) this.tags.set(id, this.tag);
      this.tag = null;
      ws.send(scenarioMsg(id, this.scenario));
    }
  }
}
