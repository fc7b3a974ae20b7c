// The client of the JSON API under /api/v1. Every call returns parsed JSON or throws an
// ApiError carrying the server's `detail` and, for a bad sweep file, its `line`.
// A network failure (offline at a field site) throws an ApiError with `offline = true`.

const BASE = "/api/v1";

export class ApiError extends Error {
  constructor(message, { status = 0, line = null, offline = false } = {}) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.line = line;
    this.offline = offline;
  }
}

function url(path, query) {
  const u = new URL(BASE + path, window.location.origin);
  for (const [key, value] of Object.entries(query || {})) {
    if (value === undefined || value === null || value === "") continue;
    u.searchParams.set(key, String(value));
  }
  return u.pathname + u.search;
}

function detailOf(body, status) {
  if (body && typeof body.detail === "string") return body.detail;
  if (body && Array.isArray(body.detail)) {
    // FastAPI validation errors: [{loc, msg}, ...]
    return body.detail.map((d) => `${(d.loc || []).slice(1).join(".")}: ${d.msg}`).join("; ");
  }
  return `request failed with HTTP ${status}`;
}

async function parse(response) {
  const text = await response.text();
  let body = null;
  if (text) {
    try { body = JSON.parse(text); } catch { body = { detail: text }; }
  }
  if (!response.ok) {
    throw new ApiError(detailOf(body, response.status), {
      status: response.status, line: body && body.line != null ? body.line : null,
    });
  }
  return body;
}

// -- the keeper token (backend api/auth.py) ---------------------------------------------
// Reads never need it. A change refused with 401 asks the shell for the token (a dialog,
// see main.js), keeps it in this browser and sends the request once more.
const TOKEN_KEY = "mastwatch.keeperToken";
let askToken = null;

// RFC 6750 §2.1 b64token, as the server's settings require: only these characters can be
// sent in the header (fetch throws a TypeError on others, e.g. a pasted "’").
const TOKEN_PATTERN = /^[A-Za-z0-9._~+/-]+=*$/;

/** Why a typed token cannot be the keeper token, or null when it can. */
export function tokenProblem(token) {
  if (!token) return "Type the token.";
  if (TOKEN_PATTERN.test(token)) return null;
  const bad = [...new Set([...token].filter((c) => !/[A-Za-z0-9._~+/=-]/.test(c)))];
  const codePoint = (c) => `U+${c.codePointAt(0).toString(16).toUpperCase().padStart(4, "0")}`;
  const named = [...new Set(bad.map((c) => (/\s/.test(c) ? "a space" : `${c} (${codePoint(c)})`)))];
  const what = named.length
    ? `It contains ${named.join(" and ")}, which a keeper token never has.`
    : "An “=” may only come at the end.";
  return `${what} A token is made of letters A–Z, a–z, digits and - . _ ~ + / only, with = signs only at the end.`;
}

/** The line shown when a change was refused and no token was given. */
export const NEEDS_TOKEN = "This change needs the keeper token.";

/** Register the function that asks for the token: ({wrong}) => Promise<string|null>. */
export function onTokenNeeded(fn) { askToken = fn; }

export function keeperToken() {
  let token = null;
  try { token = window.localStorage.getItem(TOKEN_KEY); } catch { return null; }
  // One kept before tokens were checked, which no header can carry: ask afresh instead.
  if (token && tokenProblem(token)) { setKeeperToken(null); return null; }
  return token;
}

export function setKeeperToken(token) {
  try {
    if (token) window.localStorage.setItem(TOKEN_KEY, token);
    else window.localStorage.removeItem(TOKEN_KEY);
  } catch { /* storage disabled: the token lasts for this request only */ }
}

function tokenHeaders() {
  const token = keeperToken();
  return token ? { Authorization: `Bearer ${token}` } : {};
}

/** Run send(headers); on a 401 ask for the token once and send again. */
async function withToken(send) {
  try {
    return await send(tokenHeaders());
  } catch (err) {
    if (!(err instanceof ApiError) || err.status !== 401 || !askToken) throw err;
    const token = await askToken({ wrong: Boolean(keeperToken()) });
    // Cancelled: say it to a member plainly (the server's detail is for admins).
    if (!token || tokenProblem(token)) throw new ApiError(NEEDS_TOKEN, { status: 401 });
    setKeeperToken(token);
    try {
      return await send({ Authorization: `Bearer ${token}` });
    } catch (again) {
      if (again instanceof ApiError && again.status === 401) setKeeperToken(null);
      throw again;
    }
  }
}

export async function request(method, path, options = {}) {
  if (method === "GET" || method === "HEAD") return requestOnce(method, path, options, {});
  return withToken((headers) => requestOnce(method, path, options, headers));
}

async function requestOnce(method, path, { query, json, form, signal } = {}, auth = {}) {
  const init = { method, signal, headers: { Accept: "application/json", ...auth } };
  if (json !== undefined) {
    init.headers["Content-Type"] = "application/json";
    init.body = JSON.stringify(json);
  } else if (form !== undefined) {
    init.body = form;
  }
  let response;
  try {
    response = await fetch(url(path, query), init);
  } catch (err) {
    if (err && err.name === "AbortError") throw err;
    throw new ApiError("the server cannot be reached (offline?)", { offline: true });
  }
  const body = await parse(response);
  return { status: response.status, body };
}

const get = async (path, query) => (await request("GET", path, { query })).body;
const send = async (method, path, json) => (await request(method, path, { json })).body;

/** A list endpoint may answer with a bare array or a page object {items, total}. */
export function items(body) {
  if (Array.isArray(body)) return body;
  if (body && Array.isArray(body.items)) return body.items;
  return [];
}

// -- records ---------------------------------------------------------------------------
export const sites = async () => items(await get("/sites"));
export const site = (id) => get(`/sites/${id}`);
export const createSite = (body) => send("POST", "/sites", body);
export const updateSite = (id, body) => send("PATCH", `/sites/${id}`, body);
export const deleteSite = (id) => send("DELETE", `/sites/${id}`);

export const antennas = async (siteId) => items(await get("/antennas", { site_id: siteId }));
export const antenna = (id) => get(`/antennas/${id}`);
export const createAntenna = (body) => send("POST", "/antennas", body);
export const updateAntenna = (id, body) => send("PATCH", `/antennas/${id}`, body);
export const deleteAntenna = (id) => send("DELETE", `/antennas/${id}`);
export const putFeedline = (id, body) => send("PUT", `/antennas/${id}/feedline`, body);

export const cableTypes = async () => items(await get("/cable-types"));
export const createCableType = (body) => send("POST", "/cable-types", body);

export const siteEvents = async (id) => items(await get(`/sites/${id}/events`));
export const antennaEvents = async (id) => items(await get(`/antennas/${id}/events`));
export const createSiteEvent = (id, body) => send("POST", `/sites/${id}/events`, body);
export const createAntennaEvent = (id, body) => send("POST", `/antennas/${id}/events`, body);

export const sweeps = async (antennaId, query = {}) =>
  items(await get(`/antennas/${antennaId}/sweeps`, { limit: 200, ...query }));
export const sweep = (id) => get(`/sweeps/${id}`);
export const deleteSweep = (id) => send("DELETE", `/sweeps/${id}`);
export const sweepData = (id, maxPoints = 801) => get(`/sweeps/${id}/data`, { max_points: maxPoints });
export const sweepFileUrl = (id) => `${BASE}/sweeps/${id}/file`;
export const archiveUrl = (antennaId) => `${BASE}/antennas/${antennaId}/archive`;
export const touchstoneUrl = (id, plane) => url(`/sweeps/${id}/touchstone`, { plane });

export const trend = (antennaId, band, metric, plane) =>
  get(`/antennas/${antennaId}/trend`, { band, metric, plane });

// -- what this server has -------------------------------------------------------------
let configPromise = null;

/** {stale_after_days, features: {board, health, baseline, check, dtf, match}} (fetched once). */
export function uiConfig() {
  if (!configPromise) {
    configPromise = fetch("/ui/config", { headers: { Accept: "application/json" } })
      .then(parse)
      .catch((err) => { configPromise = null; throw err; });
  }
  return configPromise;
}

/** GET /healthz: {status, database, revision, changes_need_token}. */
export const serverStatus = () => fetch("/healthz", { headers: { Accept: "application/json" } }).then(parse);

export async function has(feature) {
  const cfg = await uiConfig();
  return Boolean(cfg.features && cfg.features[feature]);
}

// -- health (F) and RF tools (C) ---------------------------------------------------------
export const board = () => get("/board");
export const health = (antennaId) => get(`/antennas/${antennaId}/health`);
export const setBaseline = (antennaId, sweepId) =>
  send("PUT", `/antennas/${antennaId}/baseline`, { sweep_id: sweepId });
export const siteCheck = (siteId, since) => get(`/sites/${siteId}/check`, { since });
export const dtf = (sweepId, query = {}) => get(`/sweeps/${sweepId}/dtf`, query);
export const match = (sweepId, hz, plane) => get(`/sweeps/${sweepId}/match`, { at_hz: hz, plane });

// -- files -----------------------------------------------------------------------------
export async function analyze(file, extra = {}) {
  const form = new FormData();
  form.append("file", file, file.name);
  for (const [k, v] of Object.entries(extra)) if (v) form.append(k, v);
  return (await request("POST", "/analyze", { form })).body;
}

/**
 * Upload one sweep file with its fields; reports progress (0..1) while sending.
 * Resolves {status, body}: 201 = stored, 200 = the same file was already on record.
 */
export function upload(antennaId, file, fields, onProgress) {
  return withToken((auth) => uploadOnce(antennaId, file, fields, onProgress, auth));
}

function uploadOnce(antennaId, file, fields, onProgress, auth) {
  return new Promise((resolve, reject) => {
    const form = new FormData();
    form.append("file", file, file.name);
    for (const [k, v] of Object.entries(fields)) if (v !== undefined && v !== null && v !== "") form.append(k, v);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `${BASE}/antennas/${antennaId}/sweeps`);
    xhr.setRequestHeader("Accept", "application/json");
    for (const [k, v] of Object.entries(auth)) xhr.setRequestHeader(k, v);
    xhr.upload.onprogress = (e) => { if (e.lengthComputable && onProgress) onProgress(e.loaded / e.total); };
    xhr.onerror = () => reject(new ApiError("the server cannot be reached (offline?)", { offline: true }));
    xhr.onload = () => {
      let body = null;
      try { body = xhr.responseText ? JSON.parse(xhr.responseText) : null; } catch { body = { detail: xhr.responseText }; }
      if (xhr.status >= 200 && xhr.status < 300) resolve({ status: xhr.status, body });
      else reject(new ApiError(detailOf(body, xhr.status), { status: xhr.status, line: body ? body.line ?? null : null }));
    };
    xhr.send(form);
  });
}
