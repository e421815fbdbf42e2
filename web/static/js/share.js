// Share links and the saved-scenario API.
//
// A share link is "/#s=" and the base64url (no padding) of the raw DEFLATE
// compression of the scenario's canonical JSON (scenario-format.md). The
// server gives each frame's link; the page only decodes links it is opened
// with, using the browser's DecompressionStream.

import { describeFields } from './words.js';

const MaxDocumentBytes = 4 << 20;

// The scenario format versions a link may hold (scenarios.supportedVersions).
export const ScenarioVersions = [1, 2, 3];

export class LinkError extends Error {}

// The encoded part of a location hash, or null when it is not a link.
export function linkPart(hash) {
  const i = hash.indexOf('s=');
  if (!hash.startsWith('#') || i !== 1) return null;
  return hash.slice(3).split('&')[0];
}

// Decode the encoded part of a share link into a scenario object. Errors
// are LinkErrors with a sentence for the user.
export async function decodeLink(enc) {
  if (!enc) throw new LinkError('the link has no scenario after “#s=”');
  if (enc.length > (MaxDocumentBytes / 3) * 4 + 4) throw new LinkError('the link is longer than any scenario can be');
  if (!/^[A-Za-z0-9_-]*={0,2}$/.test(enc)) throw new LinkError('the link holds characters that base64url does not use; was it altered when copied?');
  let bytes;
  try {
    const b64 = enc.replace(/=+$/, '').replace(/-/g, '+').replace(/_/g, '/');
    const bin = atob(b64 + '='.repeat((4 - (b64.length % 4)) % 4));
    bytes = Uint8Array.from(bin, (c) => c.charCodeAt(0));
  } catch {
    throw new LinkError('the link is not valid base64url text; was it cut short?');
  }
  let text;
  try {
    const stream = new Blob([bytes]).stream().pipeThrough(new DecompressionStream('deflate-raw'));
    const reader = stream.getReader();
    const chunks = [];
    let total = 0;
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      total += value.length;
      if (total > MaxDocumentBytes) {
        reader.cancel();
        throw new LinkError('the scenario in the link inflates past the 4 MB limit');
      }
      chunks.push(value);
    }
    text = new TextDecoder('utf-8', { fatal: true }).decode(await new Blob(chunks).arrayBuffer());
  } catch (e) {
    if (e instanceof LinkError) throw e;
    throw new LinkError('the compressed data in the link is damaged or cut short');
  }
  let s;
  try {
    s = JSON.parse(text);
  } catch {
    throw new LinkError('the link does not hold a JSON scenario');
  }
  if (!s || typeof s !== 'object' || Array.isArray(s)) throw new LinkError('the link does not hold a scenario object');
  // Version 1 links are read too: the server upgrades them, and the
  // report's warnings name any verdict the version 2 rules change.
  if (!ScenarioVersions.includes(s.version)) throw new LinkError(`the link holds scenario format version ${JSON.stringify(s.version)}; this page reads versions ${ScenarioVersions.slice(0, -1).join(', ')} and ${ScenarioVersions.at(-1)}`);
  return s;
}

// --- REST ---

export class HTTPError extends Error {
  constructor(status, message, body) {
    super(message);
    this.status = status;
    this.body = body;
  }
}

async function request(method, url, { body, headers = {} } = {}) {
  const init = { method, headers: { Accept: 'application/json', ...headers } };
  if (body !== undefined) {
    init.body = JSON.stringify(body);
    init.headers['Content-Type'] = 'application/json';
  }
  const res = await fetch(url, init);
  const text = await res.text();
  let data = null;
  try {
    data = text ? JSON.parse(text) : null;
  } catch {
    data = text;
  }
  if (!res.ok) {
    const msg = (data && (data.error || data.message)) || `${res.status} ${res.statusText}`;
    throw new HTTPError(res.status, msg, data);
  }
  return { data, etag: res.headers.get('ETag') };
}

// A scenario object from a response that holds it bare or under "scenario".
function scenarioOf(data) {
  if (data && data.scenario && typeof data.scenario === 'object') return data.scenario;
  return data;
}

const listOf = (data, key) => (Array.isArray(data) ? data : (data && data[key]) || []);

export const api = {
  // The engine's version and formats ({version, commit, …, text}).
  async version() {
    return (await request('GET', '/api/v1/version')).data;
  },
  async demos() {
    return listOf((await request('GET', '/api/v1/demos')).data, 'demos');
  },
  async demo(name) {
    return scenarioOf((await request('GET', `/api/v1/demos/${encodeURIComponent(name)}`)).data);
  },
  // The server's verdict on a scenario before it replaces the user's:
  // its share link ("/#s=…") when valid; an HTTPError (status 400, body
  // {error, fields}) when not.
  async check(scenario) {
    return (await request('POST', '/api/v1/links', { body: scenario })).data.link;
  },
  async saved() {
    return listOf((await request('GET', '/api/v1/scenarios')).data, 'scenarios');
  },
  // {scenario, etag}
  async open(name) {
    const { data, etag } = await request('GET', `/api/v1/scenarios/${encodeURIComponent(name)}`);
    return { scenario: scenarioOf(data), etag };
  },
  // Save under name. etag: the revision last read (If-Match), '*' to
  // replace whatever is there, or null to create only (If-None-Match: *).
  // Returns the new ETag. A conflict throws an HTTPError with status 412
  // or 409.
  async save(name, scenario, etag) {
    const headers = etag ? { 'If-Match': etag } : { 'If-None-Match': '*' };
    const { etag: next } = await request('PUT', `/api/v1/scenarios/${encodeURIComponent(name)}`, { body: scenario, headers });
    return next;
  },
  async remove(name, etag) {
    await request('DELETE', `/api/v1/scenarios/${encodeURIComponent(name)}`, { headers: etag ? { 'If-Match': etag } : {} });
  },
};

export const isConflict = (e) => e instanceof HTTPError && (e.status === 412 || e.status === 409);

// The reasons of a refused scenario, one phrase per field: "colour: unknown
// field; version: 2 is not supported …".
export function refusal(e, scenario) {
  const fields = (e && e.body && Array.isArray(e.body.fields)) ? e.body.fields : [];
  const why = describeFields(fields, scenario);
  return why || (e && e.message) || String(e);
}
