// The scenario library dialog: save, open and delete named scenarios
// through the REST API. A write carries the revision last read (If-Match);
// when someone else changed the scenario meanwhile, the user chooses to
// load their version or to overwrite it.

import { $, h } from './dom.js';
import { api, isConflict } from './share.js';

export function initLibrary({ store, notice, onOpen }) {
  const dlg = $('#library');
  const etags = new Map(); // name → ETag last read or written by this page
  let conflictName = null;

  const msg = (text) => { $('#lib-msg').textContent = text; };

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
        h('button', { type: 'button', onclick: () => open(it.name) }, 'Open'),
        h('button', { type: 'button', onclick: () => remove(it.name) }, 'Delete')))));
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

  async function remove(name) {
    try {
      let etag = etags.get(name);
      if (!etag) etag = (await api.open(name)).etag;
      await api.remove(name, etag);
      etags.delete(name);
      refresh();
    } catch (e) {
      msg(isConflict(e) ? `“${name}” was changed elsewhere; open it before deleting.` : `Could not delete “${name}”: ${e.message}`);
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
  $('#lib-save').addEventListener('click', () => {
    const name = $('#lib-name').value.trim();
    if (!name) return msg('Give the scenario a name.');
    save(name, etags.get(name) || null);
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
