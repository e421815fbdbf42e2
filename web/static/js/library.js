// The scenario library dialog: save, open and delete named scenarios
// through the REST API. Enter in the name field saves; a delete asks
// first and can be undone while the dialog is open. A write carries the revision last read (If-Match);
// when someone else changed the scenario meanwhile, the user chooses to
// load their version or to overwrite it.

import { $, h } from './dom.js';
import { api, isConflict } from './share.js';

export function initLibrary({ store, notice, onOpen }) {
  const dlg = $('#library');
  const etags = new Map(); // name → ETag last read or written by this page
  let conflictName = null;

  const msg = (text, ...extra) => { $('#lib-msg').replaceChildren(text, ...extra); };

  // The server's rule for names, checked here so that the message quotes
  // the name as typed (the server only sees it URL-encoded).
  const nameProblem = (name) => {
    if (!name) return 'Give the scenario a name.';
    if (name.length > 64) return `The name “${name}” is longer than 64 characters.`;
    if (/^[.-]/.test(name)) return `The name “${name}” starts with “.” or “-”; start it with a letter or digit.`;
    const bad = [...new Set(name.replace(/[A-Za-z0-9_.-]/g, ''))];
    if (bad.length) {
      const shown = bad.map((c) => (c === ' ' ? 'spaces' : `“${c}”`)).join(', ');
      return `The name “${name}” holds ${shown}; use only letters, digits, “-”, “_” and “.” (for example “${name.replace(/[^A-Za-z0-9_.-]+/g, '-').replace(/^[.-]+/, '')}”).`;
    }
    return null;
  };
  let lastDeleted = null; // {name, scenario} for undo

  async function refresh() {
    let list = [];
    try {
      list = await api.saved();
    } catch (e) {
      msg(`Could not list saved scenarios: ${e.message}`);
    }
    $('#lib-rows').replaceChildren(...list.map((it) => h('tr', {},
      h('td', {}, it.name),
      h('td', {}, it.title || ''),
      h('td', { class: 'muted small' }, it.modified ? new Date(it.modified).toLocaleString() : ''),
      h('td', { class: 'acts' },
        h('button', { type: 'button', dataset: { lib: 'open' }, onclick: () => open(it.name) }, 'Open'),
        h('button', { type: 'button', dataset: { lib: 'delete' }, onclick: (ev) => confirmRemove(ev.target, it.name) }, 'Delete')))));
    if (!list.length) $('#lib-rows').append(h('tr', {}, h('td', { colspan: 4, class: 'muted' }, 'Nothing saved yet.')));
  }

  async function open(name) {
    try {
      const { scenario, etag } = await api.open(name);
      if (etag) etags.set(name, etag);
      $('#lib-name').value = name;
      onOpen();
      store.load(scenario);
      dlg.close();
      notice(`Opened “${name}”.`);
    } catch (e) {
      msg(`Could not open “${name}”: ${e.message}`);
    }
  }

  async function save(name, etag) {
    msg('');
    $('#lib-conflict').hidden = true;
    try {
      const next = await api.save(name, store.scenario, etag);
      if (next) etags.set(name, next);
      notice(`Saved as “${name}”.`);
      refresh();
    } catch (e) {
      if (isConflict(e)) {
        conflictName = name;
        $('#lib-conflict-text').textContent = etags.has(name)
          ? `“${name}” was changed elsewhere since you opened or saved it.`
          : `A scenario named “${name}” exists already.`;
        $('#lib-conflict').hidden = false;
      } else {
        msg(`Could not save “${name}”: ${e.message}`);
      }
    }
  }

  // Delete asks in place: the row's buttons become "Delete “x”? Yes / Keep".
  function confirmRemove(btn, name) {
    const cell = btn.closest('td');
    cell.replaceChildren(
      h('span', { class: 'small' }, `Delete “${name}”? `),
      h('button', { type: 'button', class: 'danger', dataset: { lib: 'confirm-delete' }, onclick: () => remove(name) }, 'Delete'),
      h('button', { type: 'button', dataset: { lib: 'keep' }, onclick: () => refresh() }, 'Keep'));
    cell.querySelector('[data-lib="keep"]').focus();
  }

  async function remove(name) {
    try {
      const { scenario, etag: read } = await api.open(name);
      const etag = etags.get(name) || read;
      await api.remove(name, etag);
      etags.delete(name);
      lastDeleted = { name, scenario };
      msg(`Deleted “${name}”. `, h('button', { type: 'button', id: 'lib-undo', onclick: undoRemove }, 'Undo'));
      refresh();
    } catch (e) {
      msg(isConflict(e) ? `“${name}” was changed elsewhere; open it before deleting.` : `Could not delete “${name}”: ${e.message}`);
    }
  }

  async function undoRemove() {
    if (!lastDeleted) return;
    const { name, scenario } = lastDeleted;
    try {
      const next = await api.save(name, scenario, null);
      if (next) etags.set(name, next);
      lastDeleted = null;
      msg(`Restored “${name}”.`);
      refresh();
    } catch (e) {
      msg(isConflict(e) ? `A scenario named “${name}” was saved meanwhile; the deleted one was not restored.` : `Could not restore “${name}”: ${e.message}`);
    }
  }

  $('#btn-library').addEventListener('click', () => {
    msg('');
    $('#lib-conflict').hidden = true;
    if (!$('#lib-name').value && store.scenario && store.scenario.name) {
      $('#lib-name').value = store.scenario.name.toLowerCase().replace(/[^a-z0-9_.-]+/g, '-').replace(/^[-.]+|-+$/g, '').slice(0, 60);
    }
    refresh();
    dlg.showModal();
  });
  const saveTyped = () => {
    const name = $('#lib-name').value.trim();
    const problem = nameProblem(name);
    if (problem) return msg(problem);
    save(name, etags.get(name) || null);
  };
  $('#lib-save').addEventListener('click', saveTyped);
  // Enter in the name field saves; it must not submit the dialog's form,
  // which would close it without saving.
  $('#lib-name').addEventListener('keydown', (ev) => {
    if (ev.key !== 'Enter') return;
    ev.preventDefault();
    saveTyped();
  });
  // Enter's implicit submission (sent with the key's character) would
  // "click" the Close button, the form's only submit button.
  $('#lib-name').addEventListener('keypress', (ev) => {
    if (ev.key === 'Enter') ev.preventDefault();
  });
  $('#lib-reload').addEventListener('click', () => {
    $('#lib-conflict').hidden = true;
    if (conflictName) open(conflictName);
  });
  $('#lib-overwrite').addEventListener('click', async () => {
    $('#lib-conflict').hidden = true;
    if (!conflictName) return;
    try {
      const { etag } = await api.open(conflictName); // the revision there now
      save(conflictName, etag || '*');
    } catch (e) {
      msg(`Could not overwrite “${conflictName}”: ${e.message}`);
    }
  });
}
