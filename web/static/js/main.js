// The workbench page: wires the scenario store, the editor, the plots, the
// figures panel and the websocket session together.

import { $, $$, download, h } from './dom.js';
import { Editor } from './editor.js';
import { renderFigures } from './figures.js';
import { Plots, carryCharts, worked } from './charts.js';
import { Session } from './session.js';
import { HTTPError, api, decodeLink, linkPart, refusal } from './share.js';
import { Store } from './store.js';
import { initLibrary } from './library.js';
import { initKeys } from './keys.js';
import { initFocus } from './focus.js';
import { initPdCurves } from './pdcurves.js';
import { printablePNG } from './export.js';
import { Staleness } from './stale.js';
import { initCopyLink } from './copylink.js';
import { Story } from './story.js';
import { fieldName, pdText, statusLabel } from './words.js';
import { onUnits, restate, typedFrom } from './units.js';
import { initUnitsPick } from './unitspick.js';

const DefaultDemo = 'harbour-skiff';

const store = new Store();
// The engine's sentences read the scene's own typed values back as typed.
typedFrom(() => store.scenario);
const editor = new Editor({
  scene: $('#ed-scene'), targets: $('#ed-targets'), radar: $('#ed-radar'), pulse: $('#ed-pulse'), receive: $('#ed-receive'),
}, store);

let lastFrame = null;
let pendingFrame = null;
let applyScheduled = false;
let lastErrorId = 0;
let pinned = null;
let shownLink = null; // encoded part of the link in the address bar
let pushNextLink = false; // the next frame's link starts a new history entry
const story = new Story($('.figures .fig-head'));

// Which scene the plots show, against the editor's (see stale.js).
const stale = new Staleness($('.plots'));
let shownVersion = null; // store version of the plotted scene
let errorVersion = null; // store version the server last refused, and why
let errorText = null;
const rejected = new Set(); // ids of refused scenario messages
let connState = 'connecting';
let wasLive = false; // reconnecting after a drop counts as offline
function refreshStale() {
  stale.update({
    behind: shownVersion !== store.version,
    invalid: editor.localProblem() || (errorVersion === store.version ? errorText : null),
    offline: connState === 'offline' || (wasLive && connState !== 'live'),
  });
}
editor.onLocalErrors = refreshStale;

let openingLink = null; // the link being opened (one paste fires hashchange and popstate)

// Measured latencies, edit send → new pixels, for the browser tests.
const latencies = [];
window.__pwLatencies = latencies;

const session = new Session({ onFrame, onError, onStatus });
const plots = new Plots({
  profile: $('#chart-profile'), echo: $('#chart-echo'), response: $('#chart-response'), ambiguity: $('#chart-ambiguity'),
  ambcuts: $('#chart-ambcuts'), rdmap: $('#chart-rdmap'), rdcuts: $('#chart-rdcuts'),
  pulse: $('#chart-pulse'), filter: $('#chart-filter'), pdcurves: $('#chart-pdcurves'),
}, {
  onView: (range, width, mapWidth) => session.sendView(range, width, mapWidth),
  onDrag: (id, r, r0) => editor.dragTo(id, r, r0),
  onDragEnd: () => {
    editor.dragOrigin = null;
    store.seal();
    if (formsTimer) renderForms();
  },
  onSelect: (id) => editor.selectId(id),
  onNudge: (id, dB) => {
    const i = (store.scenario.targets || []).findIndex((t) => t.id === id);
    if (i >= 0) editor.nudge(i, dB);
  },
  onCell: (cell) => session.sendCell(cell),
  wavelength: () => {
    const f = store.scenario && store.scenario.radar && store.scenario.radar.carrier_hz;
    return f > 0 ? 299792458 / f : NaN;
  },
  hoverCard,
  onSettle: () => settle(),
});
const focusUI = initFocus({ plots, frame: () => lastFrame });
const pdCurves = initPdCurves({ plots, scenario: () => store.scenario });
// Modules that add panels of their own (schedule.js) see each frame
// before the plots apply it.
const frameHooks = [];
window.__pw = { store, editor, plots, session, stale, frame: () => lastFrame, settled: () => settledId, focus: focusUI.focus, onFrame: (fn) => frameHooks.push(fn) };

// While a marker is dragged, the editor's forms and the story follow the
// scene at most every FormsMs: re-rendering them on every step of the
// drag cost more than drawing the plot. The drag's end renders them.
const FormsMs = 100;
let formsTimer = 0;
let formsAt = -Infinity;
function renderForms() {
  clearTimeout(formsTimer);
  formsTimer = 0;
  formsAt = performance.now();
  editor.render(store.scenario);
  story.render(store.scenario, lastFrame && lastFrame.report);
  worked('forms', formsAt);
}

store.onChange((s, cause) => {
  session.noteEdit();
  addressLater();
  if (cause === 'load' || cause === 'link') { // a new scene: its own cuts
    if (session.cell) session.sendCell(null);
    plots.clearCell();
    // and its story, at the top of the figures column: the column stayed
    // scrolled where the last scene's cards were.
    $('.figures').scrollTop = 0;
  }
  // The edit goes to the server first; the forms follow while it computes.
  session.sendScenario(s, cause === 'link' ? 'link' : null, store.version);
  session.sendNow();
  if (cause !== 'edit' || !plots.drag) renderForms();
  else if (!formsTimer) formsTimer = setTimeout(renderForms, Math.max(0, formsAt + FormsMs - performance.now()));
  refreshStale();
  $('#btn-undo').disabled = !store.undoStack.length;
  $('#btn-redo').disabled = !store.redoStack.length;
});

// --- frames ---

function onFrame(msg) {
  // A frame not yet applied is skipped, but not its chart options: the
  // server sends a chart whole only once and then data merges, so a
  // skipped full option must still be applied before the merges after it.
  if (pendingFrame) msg.charts = carryCharts(pendingFrame.charts || {}, msg.charts || {});
  pendingFrame = msg;
  if (applyScheduled) return;
  // The first frame since the last paint is drawn at once (its pixels go
  // out with the next vsync); frames that follow within the same frame
  // time wait for the next animation frame, and only the newest is drawn.
  if (performance.now() - lastApplyAt > 16) {
    applyFrame();
    return;
  }
  applyScheduled = true;
  requestAnimationFrame(applyFrame);
}
let lastApplyAt = -Infinity;
let settledId = null; // the newest frame whose plots, panels and story are all drawn
let paintedId = null; // the newest frame whose after-paint work ran
// A frame is settled once its after-paint work ran and the profile chart
// itself (not only the fast layer) shows it.
function settle() {
  if (lastFrame && paintedId === lastFrame.id && !plots.unsettled()) settledId = lastFrame.id;
}

// The editor's status marks and the figures panel follow the frames, but
// while frames stream in (a drag) at most every PanelMs: rebuilding the
// panel costs as much as a chart, and the plots are what the hand follows.
// The newest frame's panels are always drawn.
const PanelMs = 100;
const DragPanelMs = 250; // while a marker is dragged
let panelsAt = -Infinity;
let panelTimer = 0;
let panelFrame = null;
function panels(f) {
  panelFrame = f;
  if (panelTimer) return;
  const wait = panelsAt + (plots.drag ? DragPanelMs : PanelMs) - performance.now();
  if (wait <= 0) {
    drawPanels();
    return;
  }
  panelTimer = setTimeout(drawPanels, wait);
}
function drawPanels() {
  panelTimer = 0;
  const f = panelFrame;
  panelsAt = performance.now();
  editor.setReport(f.report);
  renderFigures($('#figures'), f.report, pinned ? f.reference : null, f.compute_ms, selectedId());
  worked('panels', panelsAt);
}
const selectedId = () => ((store.scenario && store.scenario.targets) || [])[editor.selected]?.id;

// A click on a target's card (or on a masked target's reason in the
// story) selects the target: its row and form in the Scene tab, and its
// card marked, as a click on its marker does.
function markCard(id) {
  for (const c of $$('.tcard[data-target]')) c.classList.toggle('sel', c.dataset.target === id);
}
editor.selectHooks.push((i) => markCard(((store.scenario && store.scenario.targets) || [])[i]?.id));
$('.figures').addEventListener('click', (ev) => {
  const card = ev.target.closest('.tcard[data-target], .story-masked[data-target]');
  if (!card || ev.target.closest('a, button, input, select')) return;
  // Selecting text in a card is not a click on it.
  if (String(getSelection() || '') !== '') return;
  editor.selectId(card.dataset.target);
  markCard(card.dataset.target);
  showTab('scene');
  const row = document.querySelector(`#ed-targets tr[data-row="${editor.selected}"]`);
  if (row) row.scrollIntoView({ block: 'nearest' });
});

// afterPaint runs fn once the next animation frame's pixels are out: a
// task posted from the frame's requestAnimationFrame callback runs after
// that frame's style, layout and paint.
const paintChannel = new MessageChannel();
const afterPaintQueue = [];
paintChannel.port1.onmessage = () => {
  const fns = afterPaintQueue.splice(0);
  for (const fn of fns) fn();
};
function afterPaint(fn) {
  requestAnimationFrame(() => {
    const frameAt = performance.now(); // this animation frame's callbacks run now
    afterPaintQueue.push(() => fn(frameAt));
    paintChannel.port2.postMessage(0);
  });
}

// Apply the newest frame in one animation frame; older unapplied frames
// are skipped. The profile is drawn first; the other plots, the panels,
// the story and the address bar follow once its pixels are on screen.
function applyFrame() {
  applyScheduled = false;
  const f = pendingFrame;
  pendingFrame = null;
  if (!f) return;
  lastFrame = f;
  const shows = session.versionAt(f.id, rejected);
  if (shows !== null) shownVersion = shows;
  const t0 = performance.now();
  lastApplyAt = t0;
  for (const fn of frameHooks) fn(f);
  plots.apply(f);
  focusUI.refresh();
  pdCurves.refresh(f);
  const t1 = performance.now();
  if (session.sent.has(f.id) && f.id > lastErrorId) {
    editor.clearErrors();
    $('#orphan-errors').textContent = '';
    markTabs();
  }
  refreshStale();
  const sentAt = session.sent.get(f.id);
  const t2 = performance.now();
  performance.mark(`pw-apply-${f.id}`);
  afterPaint((frameAt) => {
    performance.mark(`pw-paint-${f.id}`);
    const t3 = performance.now();
    // The rest of the frame, after the profile's paint.
    const rest = plots.flushDeferred();
    panels(f);
    story.render(store.scenario, f.report);
    if (f.link) addressSoon(f.link);
    const t4 = performance.now();
    paintedId = f.id;
    settle();
    let m = { duration: t3 - sentAt };
    if (sentAt !== undefined) {
      try {
        m = performance.measure(`pw-edit-${f.id}`, `pw-send-${f.id}`, `pw-paint-${f.id}`);
      } catch { /* its marks were cleared */ }
    }
    clearMarksTo(f.id);
    if (sentAt === undefined) return;
    const editAt = session.editedAt.get(f.id);
    // ms: send → the profile's new pixels; edit_ms: the edit (the store's
    // change) → the same pixels; wait_ms: send → the frame's arrival
    // (server, network, and the page's main thread being busy);
    // parse_ms: JSON.parse of the frame; page_ms: arrival → pixels, of
    // which charts_ms went to the profile's setOption and panel_ms to
    // the marks; rest_ms: the other plots, panels and story after the
    // paint, and all_ms: send → the end of those. Of page_ms, frame_ms
    // is the wait from the end of the apply to the animation frame that
    // paints it and paint_ms that frame (its callbacks, style, layout and
    // paint); edit_at and pixels_at place the edit in time, against the
    // page's other work (__pwWork, __pwLoAF).
    const entry = {
      fast: plots.unsettled(),
      id: f.id, ms: m.duration, edit_ms: editAt !== undefined ? t3 - editAt : m.duration, compute_ms: f.compute_ms,
      wait_ms: f.arrivedAt - sentAt, parse_ms: f.parseMs, page_ms: t3 - f.arrivedAt,
      frame_ms: frameAt - t2, paint_ms: t3 - frameAt, edit_at: editAt !== undefined ? editAt : sentAt, pixels_at: t3,
      charts_ms: t1 - t0, panel_ms: t2 - t1, rest_ms: t4 - t3, all_ms: t4 - sentAt, rest_charts: rest,
      held: plots.held(), panels_held: !!panelTimer,
    };
    latencies.push(entry);
    if (latencies.length > 1000) latencies.shift();
  });
}

// The performance marks and measures of the frames up to id (those of
// frames skipped too): a long drag left tens of thousands in the page's
// timeline.
let marksClearedTo = 0;
function clearMarksTo(id) {
  for (let k = marksClearedTo + 1; k <= id; k++) {
    for (const name of ['send', 'apply', 'paint']) performance.clearMarks(`pw-${name}-${k}`);
    performance.clearMeasures(`pw-edit-${k}`);
  }
  marksClearedTo = Math.max(marksClearedTo, id);
}

// The address bar follows the shown scene's link once the edits rest:
// AddressMs after the last frame or edit, in idle time (at most
// AddressIdleMs later). Each write of the address cost the page's main
// thread 7–44 ms (medians, load 10–12; history.replaceState brings style
// and layout up to date) and the browser's process 40–65 ms of CPU
// (its CPU per edit fell from 59–89 ms to 16–25 ms without it). Paid
// once per edit, it fell on the next edit's way; now a run of edits (a
// drag, the wheel, the keys, one nudge after another) pays it once, when
// it stops.
// The page is settled without it (settled() does not wait for it): a
// test that needs the address waits for location.hash. Leaving the page
// (pagehide, a hidden tab) and a location changed by the user (back,
// forward, a pasted link) write it or drop it at once.
const AddressMs = 600;
const AddressIdleMs = 400;
let addressTimer = 0;
let addressIdle = 0;
let addressLink = null; // the link still to write, or null
function addressSoon(link) {
  addressLink = link;
  addressLater();
}
// Put the address off: an edit or a frame came.
function addressLater() {
  if (addressLink === null) return;
  cancelAddress();
  addressTimer = setTimeout(() => {
    addressTimer = 0;
    addressIdle = requestIdleCallback(addressNow, { timeout: AddressIdleMs });
  }, AddressMs);
}
function cancelAddress() {
  clearTimeout(addressTimer);
  addressTimer = 0;
  if (addressIdle) cancelIdleCallback(addressIdle);
  addressIdle = 0;
}
function addressNow() {
  cancelAddress();
  const link = addressLink;
  addressLink = null;
  if (link === null) return;
  const t0 = performance.now();
  updateAddress(link);
  worked('address', t0);
}
document.addEventListener('visibilitychange', () => {
  if (document.visibilityState === 'hidden') addressNow();
});
// A reload (or back and forward to this page) made while the address
// still waits would open the link before the last edits: the browser
// takes the entry's URL before the page hears of it. So leaving the page
// also keeps the link in the tab's session storage, with the address it
// was to replace, and the page opens it on its return to that address.
const PendingKey = 'pulsewright-pending-link';
addEventListener('pagehide', () => {
  if (addressLink === null) return;
  const enc = linkPart(addressLink.slice(addressLink.indexOf('#')));
  try {
    if (enc !== null) sessionStorage.setItem(PendingKey, JSON.stringify({ from: location.hash, enc }));
  } catch { /* storage refused: the address below is all there is */ }
  addressNow();
});
// The link kept for this address by pagehide, written into the address
// bar, or null.
function pendingLink() {
  let p = null;
  try {
    p = JSON.parse(sessionStorage.getItem(PendingKey) || 'null');
    sessionStorage.removeItem(PendingKey);
  } catch { /* none */ }
  const nav = performance.getEntriesByType('navigation')[0];
  if (!p || typeof p.enc !== 'string' || p.from !== location.hash || !nav || (nav.type !== 'reload' && nav.type !== 'back_forward')) return null;
  history.replaceState(null, '', `${location.pathname}${location.search}#s=${p.enc}`);
  return p.enc;
}

function updateAddress(link) {
  const enc = linkPart(link.slice(link.indexOf('#')));
  if (enc === null || enc === shownLink) return;
  const url = `${location.pathname}${location.search}#s=${enc}`;
  if (pushNextLink && shownLink !== null) history.pushState(null, '', url);
  else history.replaceState(null, '', url);
  pushNextLink = false;
  shownLink = enc;
}

let lastErrorFields = null; // the server's field errors shown now, for a change of units
function onError(msg) {
  rejected.add(msg.id);
  lastErrorFields = msg.fields || null;
  const v = session.versionOf(msg.id);
  lastErrorId = msg.id;
  const first = (msg.fields || [])[0];
  const m = first && first.path && first.path.match(/^targets\[(\d+)\]/);
  if (m && !$('.editor').contains(document.activeElement)) editor.select(Number(m[1]));
  const orphans = editor.showErrors(msg.fields);
  if (!(msg.fields || []).length && msg.error) orphans.push(msg.error);
  $('#orphan-errors').textContent = orphans.join('\n');
  markTabs();
  if (v !== null) {
    // The banner on the plots names the field; the message is the one
    // beside the field, in its units, when it has one.
    const fe = (msg.fields || [])[0];
    const slot = fe && fe.path && document.querySelector(`[data-err-for="${CSS.escape(fe.path)}"]`);
    const said = slot && slot.textContent ? slot.textContent : fe && fe.message;
    errorVersion = v;
    errorText = fe ? (fe.path ? `${fieldName(fe.path, store.scenario)}: ${said}` : fe.message) : msg.error;
    refreshStale();
  }
  // Show the panel of the first error, unless the user is typing in the
  // editor: then the tabs only carry a mark.
  const panel = editor.errorPanel();
  const tab = panel === 'targets' ? 'scene' : panel;
  if (tab && !$('.editor').contains(document.activeElement)) showTab(tab);
}

// Mark each tab whose panel holds an error message.
function markTabs() {
  for (const b of $$('.tabs [data-tab]')) {
    const p = $(`[data-panel="${b.dataset.tab}"]`);
    b.classList.toggle('has-err', !!p.querySelector('.err:not(:empty)'));
  }
}

function onStatus(state) {
  $('#conn').dataset.state = state;
  $('#conn-text').textContent = state;
  connState = state;
  if (state === 'live') wasLive = true;
  refreshStale();
}

// --- notices, tabs, hover card ---

// Information notices fade after a few seconds; errors stay until closed.
// extra: an element shown under the text (the link to copy by hand).
let noticeTimer = 0;
function notice(text, kind = 'info', extra = null) {
  $('#notice-text').textContent = text;
  let more = $('#notice-extra');
  if (!more) {
    more = h('div', { id: 'notice-extra', class: 'notice-extra' });
    $('#notice-text').after(more);
  }
  more.replaceChildren(...(extra ? [extra] : []));
  more.hidden = !extra;
  $('#notice').dataset.kind = kind;
  $('#notice').hidden = false;
  clearTimeout(noticeTimer);
  if (kind === 'info') noticeTimer = setTimeout(() => { $('#notice').hidden = true; }, 6000);
}
$('#notice-close').addEventListener('click', () => { $('#notice').hidden = true; });

function showTab(name) {
  for (const b of $$('.tabs [data-tab]')) b.setAttribute('aria-selected', String(b.dataset.tab === name));
  for (const p of $$('[data-panel]')) p.hidden = p.dataset.panel !== name;
}
for (const b of $$('.tabs [data-tab]')) b.addEventListener('click', () => showTab(b.dataset.tab));

function hoverCard(hit) {
  const card = $('#hover-card');
  const t = hit && lastFrame && (lastFrame.report.targets || []).find((x) => x.id === hit.id);
  if (!t) {
    card.hidden = true;
    return;
  }
  card.replaceChildren();
  const head = document.createElement('div');
  head.className = `hc-head st-${t.status}`;
  head.textContent = `${t.id} · ${statusLabel(t.status)}`;
  const nums = document.createElement('div');
  nums.className = 'hc-nums';
  nums.textContent = (t.pd !== undefined ? `${t.status === 'folded' ? 'ghost Pd' : 'Pd'} ${pdText(t.pd)}${t.status === 'masked' && t.pd_alone !== undefined ? ` (alone ${pdText(t.pd_alone)})` : ''} · ` : '')
    + `SNR ${t.snr_db.toFixed(1)} dB` + (t.margin_db !== undefined ? ` · margin ${t.margin_db.toFixed(1)} dB` : '')
    + (t.masked_by ? (t.masked_by === t.id ? ' · masked by its own sidelobes' : ` · masked by ${t.masked_by}`) : '');
  const reason = document.createElement('div');
  reason.textContent = restate(t.reason);
  const tip = document.createElement('div');
  tip.className = 'hc-tip';
  tip.textContent = 'drag to move · wheel to change RCS';
  card.append(head, nums, reason, tip);
  card.hidden = false;
  const x = Math.min(hit.clientX + 14, innerWidth - card.offsetWidth - 8);
  const y = Math.min(hit.clientY + 14, innerHeight - card.offsetHeight - 8);
  card.style.left = `${x}px`;
  card.style.top = `${y}px`;
}

// --- links and history ---

// A scene from outside (a link, a file) replaces the user's only once the
// server accepts it; otherwise the page says why and keeps the scene.
async function vetted(s, what) {
  const kept = store.scenario ? 'The current scene is kept.' : 'The start scene is shown instead.';
  try {
    await api.check(s);
    return true;
  } catch (e) {
    if (e instanceof HTTPError && e.status >= 400 && e.status < 500) {
      notice(`${what} holds a scenario that cannot be used: ${refusal(e, s)}. ${kept}`, 'error');
    } else {
      notice(`${what} could not be checked (${e.message}); is the Pulsewright server running? ${kept}`, 'error');
    }
    return false;
  }
}

async function openLink(enc) {
  if (enc === openingLink) return;
  openingLink = enc;
  try {
    let s;
    try {
      s = await decodeLink(enc);
    } catch (e) {
      notice(`This share link cannot be opened: ${e.message}. ${store.scenario ? 'The current scene is kept.' : 'The start scene is shown instead.'}`, 'error');
      s = null;
    }
    if (!s || !(await vetted(s, 'This share link'))) {
      if (!store.scenario) await loadStart();
      restoreAddress();
      return;
    }
    shownLink = enc;
    store.load(s, { cause: 'link' });
  } finally {
    if (openingLink === enc) openingLink = null;
  }
}

function restoreAddress() {
  const url = shownLink ? `${location.pathname}#s=${shownLink}` : location.pathname;
  history.replaceState(null, '', url);
}

function fromLocation() {
  const enc = linkPart(location.hash);
  if (enc === null || enc === shownLink) return;
  // The user's location wins over a link not yet written.
  cancelAddress();
  addressLink = null;
  openLink(enc);
}
addEventListener('hashchange', fromLocation);
addEventListener('popstate', fromLocation);

// --- scenes ---

async function loadDemo(name) {
  try {
    const s = await api.demo(name);
    pushNextLink = true;
    store.load(s);
  } catch (e) {
    notice(`Could not load the built-in scene “${name}”: ${e.message}`, 'error');
  }
}

async function fillDemos() {
  let demos = [];
  try {
    demos = await api.demos();
    const sel = $('#demo-select');
    for (const d of demos) {
      const o = document.createElement('option');
      o.value = d.name;
      o.textContent = d.title || d.name;
      o.title = d.summary || '';
      sel.append(o);
    }
  } catch { /* the list is a convenience */ }
  return demos;
}
$('#demo-select').addEventListener('change', (ev) => {
  if (ev.target.value) loadDemo(ev.target.value);
  ev.target.value = '';
});

// --- toolbar ---

$('#btn-undo').addEventListener('click', () => store.undo());
$('#btn-redo').addEventListener('click', () => store.redo());

$('#btn-pin').addEventListener('click', () => {
  pinned = pinned ? null : structuredClone(store.scenario);
  session.sendPin(pinned);
  $('#btn-pin').textContent = pinned ? 'Unpin reference' : 'Pin reference';
  $('#btn-pin').setAttribute('aria-pressed', String(!!pinned));
  $('#pin-badge').hidden = !pinned;
  session.sendScenario(store.scenario, null, store.version); // a fresh frame with (or without) the reference
});

initCopyLink({ button: $('#btn-share'), frame: () => lastFrame, stale, store, notice });

$('#btn-import').addEventListener('click', () => $('#file-import').click());
$('#file-import').addEventListener('change', async (ev) => {
  const file = ev.target.files[0];
  ev.target.value = '';
  if (!file) return;
  try {
    const s = JSON.parse(await file.text());
    if (!s || typeof s !== 'object' || Array.isArray(s)) throw new Error('not a JSON object');
    if (!(await vetted(s, `The file ${file.name}`))) return;
    pushNextLink = true;
    store.load(s);
  } catch (e) {
    notice(`Could not import ${file.name}: ${e.message}. The current scene is kept.`, 'error');
  }
});

const fileStem = () => ((store.scenario && store.scenario.name) || 'scenario').replace(/[^\w.-]+/g, '-').replace(/^-|-$/g, '').slice(0, 60) || 'scenario';
$('#btn-export').addEventListener('click', () => {
  download(`${fileStem()}.json`, JSON.stringify(store.scenario, null, 2) + '\n', 'application/json');
});
// The engine's stamp line (GET /api/v1/version), set below: the footer
// shows it and the Profile CSV opens with it as a comment line, as every
// CSV the program writes does (docs/report-format.md).
let engineText = '';
$('#btn-csv').addEventListener('click', () => download(`${fileStem()}-profile.csv`, (engineText ? `# ${engineText}\n` : '') + plots.profileCSV(), 'text/csv'));
// PNG: a printable picture of the shown plot, titled, without the slider.
// A CPI map is named by its CPI.
const plotTitle = (name) => {
  const cpi = /^cpimap(\d+)$/.exec(name);
  if (cpi) return `CPI ${cpi[1]} range–Doppler map`;
  return ($(`.plot-head [data-show="${name}"]`) || $('.plot-label')).textContent.trim();
};
for (const b of $$('[data-png]')) {
  b.addEventListener('click', async () => {
    let name = b.dataset.png;
    // The CPI maps' tab, opened before its maps arrived: its first map.
    const first = name === 'cpimaps' && $$('#cpimaps .cpi-map').find((x) => !x.hidden);
    if (first) name = `cpimap${first.dataset.cpi}`;
    if (!plots.charts[name]) {
      notice('This tab holds no plot to save as PNG.');
      return;
    }
    const title = (store.scenario && store.scenario.name) || 'Untitled scene';
    const when = new Date().toISOString().slice(0, 16).replace('T', ' ');
    download(`${fileStem()}-${name}.png`, await printablePNG(plots.charts[name], { title, subtitle: `${plotTitle(name)} · Pulsewright · ${when} UTC` }));
  });
}

initLibrary({ store, notice, onOpen: () => { pushNextLink = true; } });
// The footer names the engine, as reports and exports do.
// Where the stamp does not fit beside the caution it takes a second
// line (state.css); its title also holds it.
api.version().then((v) => {
  engineText = v.text;
  const el = $('#engine');
  el.textContent = v.text;
  el.title = `${v.text}. ${el.title}`;
}).catch(() => {});
initKeys({ store, editor, lastFrame: () => lastFrame, profile: $('#chart-profile') });

// Units: the editor, the panels and the plots' axes follow a new choice.
initUnitsPick($('#conn'));
onUnits(() => {
  editor.shape = '';
  if (store.scenario) editor.render(store.scenario);
  // The refusal of the current scene, restated beside its fields.
  if (errorVersion === store.version && lastErrorFields) {
    editor.showErrors(lastErrorFields);
    const fe = lastErrorFields[0];
    const slot = fe && fe.path && document.querySelector(`[data-err-for="${CSS.escape(fe.path)}"]`);
    if (slot && slot.textContent) errorText = `${fieldName(fe.path, store.scenario)}: ${slot.textContent}`;
  }
  if (panelFrame) drawPanels();
  plots.applyUnits();
  story.render(store.scenario, lastFrame && lastFrame.report);
  refreshStale();
});

// --- start ---

// Long tasks (> 50 ms) while the page runs, for the browser tests: live
// updates must not stutter the page.
window.__pwLongTasks = [];
try {
  new PerformanceObserver((list) => {
    for (const e of list.getEntries()) window.__pwLongTasks.push(e.duration);
  }).observe({ type: 'longtask' });
} catch { /* not supported */ }
// Long animation frames (> 50 ms, the Long Animation Frames API), for the
// browser tests: when, how long, how much of it went to style, layout and
// paint, and the scripts that ran in it (each ≥ 5 ms, by entry point).
window.__pwLoAF = [];
try {
  new PerformanceObserver((list) => {
    for (const e of list.getEntries()) {
      window.__pwLoAF.push({
        start: e.startTime, ms: e.duration, render_ms: e.renderStart ? e.startTime + e.duration - e.renderStart : 0,
        scripts: (e.scripts || []).map((x) => ({ name: `${x.invoker} ${x.sourceFunctionName || ''}`.trim(), ms: x.duration, layout_ms: x.forcedStyleAndLayoutDuration })),
      });
      if (window.__pwLoAF.length > 500) window.__pwLoAF.shift();
    }
  }).observe({ type: 'long-animation-frame' });
} catch { /* not supported */ }

session.connect();
const demosReady = fillDemos();
const startLink = pendingLink() ?? linkPart(location.hash);
function loadStart() {
  return demosReady.then((demos) => loadDemo((demos.find((d) => d.start) || {}).name || DefaultDemo));
}
if (startLink !== null) openLink(startLink);
else loadStart();
