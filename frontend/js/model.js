// Reading the API's records into the shapes the pages draw. Kept in one place so a change
// of a response shape is one edit here, not one per page.

import * as api from "./api.js";
import { centreSwept } from "./format.js";

/**
 * The metrics of a sweep (or an analyze preview) at one plane: {bands, resonances, ...}
 * from its `metrics: {measured, feedpoint}`; the measured plane when there is no feedpoint.
 */
export function planeMetrics(sweep, plane = "feedpoint") {
  const m = sweep && sweep.metrics;
  if (!m) return null;
  return m[plane] ?? m.measured ?? null;
}

/** A sweep's per-band metric rows at one plane ("measured" or "feedpoint"). */
export function bandRows(sweep, plane = "feedpoint") {
  const pm = planeMetrics(sweep, plane);
  return pm && Array.isArray(pm.bands) ? pm.bands : [];
}

/** The plane metrics are judged at: the feedpoint when the sweep has one. */
export function bestPlane(sweep) {
  return sweep && sweep.metrics && sweep.metrics.feedpoint ? "feedpoint" : "measured";
}

export function statusOf(sweep) {
  return sweep ? sweep.status ?? "unknown" : "unknown";
}

export function reasonsOf(x) {
  const r = x && (x.status_reasons ?? x.reasons ?? []);
  return Array.isArray(r) ? r.map((v) => (typeof v === "string" ? v : v.text ?? v.message ?? JSON.stringify(v))) : [];
}

/**
 * The status board: [{site, antennas: [card]}] with, per card, the antenna, its verdict
 * and reasons, last sweep, SWR at band centres and a min-SWR series for the sparkline.
 * Uses GET /board when the server has it, else composes from the records routes.
 */
export async function loadBoard() {
  const cfg = await api.uiConfig();
  const board = cfg.features.board ? fromBoard(await api.board()) : await composeBoard();
  if (board.staleAfterDays === null) board.staleAfterDays = cfg.stale_after_days ?? null;
  return board;
}

function cardFrom(a, extra) {
  return {
    id: a.id ?? a.antenna_id,
    name: a.name,
    kind: a.kind ?? "",
    bands: a.bands ?? [],
    status: extra.status ?? "unknown",
    reasons: extra.reasons ?? [],
    lastSweep: extra.lastSweep ?? null,
    swrCenter: extra.swrCenter ?? [],
    spark: extra.spark ?? [],
  };
}

function fromBoard(body) {
  const sites = body.sites ?? [];
  return {
    staleAfterDays: body.stale_after_days ?? null,
    sites: sites.map((s) => ({
      site: s.site ?? { id: s.id, name: s.name, itu_region: s.itu_region, locator: s.locator },
      cards: (s.antennas ?? []).map((a) => {
        const ant = a.antenna ?? a;
        const last = a.latest_sweep ?? a.last_sweep ?? null;
        const bands = a.band_swr ?? a.swr_center ?? a.bands_swr ?? [];
        return cardFrom(ant, {
          status: a.status ?? a.verdict ?? (last && last.status),
          reasons: reasonsOf(a).length ? reasonsOf(a) : reasonsOf(last),
          lastSweep: last ? { id: last.id ?? last.sweep_id, measured_at: last.measured_at } : null,
          swrCenter: Array.isArray(bands)
            ? bands.map((b) => ({ band: b.band, value: b.swr_center ?? b.value ?? null,
              swept: b.centre_swept ?? true }))
            : Object.entries(bands).map(([band, value]) => ({ band, value })),
          spark: (a.sparkline ?? a.spark ?? a.min_swr_series ?? []).map((p) => ({
            t: p.measured_at ?? p.t, v: p.value ?? p.min_swr ?? p.v,
          })),
        });
      }),
    })),
  };
}

async function composeBoard() {
  const sites = await api.sites();
  const all = await api.antennas();
  const cards = await Promise.all(all.map(async (a) => {
    const [latest] = await api.sweeps(a.id, { limit: 1 });
    const full = latest ? await api.sweep(latest.id) : null;
    const plane = bestPlane(full);
    const rows = bandRows(full, plane);
    let spark = [];
    const band = (a.bands ?? [])[0];
    if (band) {
      try {
        const t = await api.trend(a.id, band, "min_swr");
        spark = (t.points ?? []).map((p) => ({ t: p.measured_at, v: p.value }));
      } catch { spark = []; }
    }
    return { siteId: a.site_id, card: cardFrom(a, {
      status: statusOf(full), reasons: reasonsOf(full),
      lastSweep: full ? { id: full.id, measured_at: full.measured_at } : null,
      swrCenter: rows.map((r) => ({ band: r.band, value: r.swr_center, swept: centreSwept(r) })),
      spark,
    }) };
  }));
  return {
    staleAfterDays: null,
    sites: sites.map((s) => ({ site: s, cards: cards.filter((c) => c.siteId === s.id).map((c) => c.card) })),
  };
}

// -- sweep arrays ----------------------------------------------------------------------

function pick(obj, ...names) {
  for (const n of names) if (obj && obj[n] !== undefined && obj[n] !== null) return obj[n];
  return undefined;
}

/**
 * The arrays of GET /sweeps/{id}/data at one plane, as {freq, re, im, r, x, swr, rl, z0,
 * hasPhase, plane}. Values the server leaves out are derived from Γ here with the
 * definitions of DESIGN.md (Z = z0(1+Γ)/(1−Γ), SWR = (1+|Γ|)/(1−|Γ|), RL = −20 log10 |Γ|);
 * SWR is null where |Γ| ≥ 1 (infinite), exactly as the API sends it.
 */
export function planeArrays(body, plane = "measured") {
  const freq = pick(body, "freq_hz", "frequency_hz", "f_hz") ?? [];
  const z0 = pick(body, "z0", "z0_ohm") ?? 50;
  const planes = body.planes ?? body;
  let p = planes[plane];
  let used = plane;
  if (!p && plane === "feedpoint") { p = planes.measured; used = "measured"; }
  if (!p) p = body;
  const re = pick(p, "gamma_re", "re") ?? [];
  const im = pick(p, "gamma_im", "im") ?? [];
  const hasPhase = pick(body, "has_phase") ?? true;
  let r = pick(p, "r_ohm", "r", "R");
  let x = pick(p, "x_ohm", "x", "X");
  let swr = pick(p, "swr", "SWR");
  let rl = pick(p, "return_loss_db", "rl_db", "return_loss");
  if ((!r || !x) && re.length && hasPhase) {
    r = []; x = [];
    for (let i = 0; i < re.length; i++) {
      // Z/z0 = (1+Γ)/(1−Γ)
      const dr = 1 - re[i], di = -im[i];
      const den = dr * dr + di * di;
      const nr = 1 + re[i], ni = im[i];
      r.push(den ? (z0 * (nr * dr + ni * di)) / den : Infinity);
      x.push(den ? (z0 * (ni * dr - nr * di)) / den : Infinity);
    }
  }
  const mag = re.map((v, i) => Math.hypot(v, im[i] ?? 0));
  if (!swr) swr = mag.map((m) => (m >= 1 ? null : (1 + m) / (1 - m)));
  if (!rl) rl = mag.map((m) => (m > 0 ? -20 * Math.log10(m) : null));
  return { freq, re, im, r: r ?? [], x: x ?? [], swr, rl, z0, hasPhase, plane: used };
}

/** Resonances of a sweep at a plane from its metrics: [{hz, kind, r_ohm, q}]. */
export function resonancesOf(sweep, plane = "measured") {
  const pm = planeMetrics(sweep, plane);
  return pm && Array.isArray(pm.resonances) ? pm.resonances : [];
}

/** The band edges of a sweep's metric rows: [{band, low_hz, high_hz}]. */
export function bandsOf(sweep, plane = "measured") {
  const seen = new Map();
  for (const r of bandRows(sweep, plane)) if (!seen.has(r.band)) seen.set(r.band, { band: r.band, low_hz: r.low_hz, high_hz: r.high_hz });
  return [...seen.values()];
}

/** Linear interpolation of ys at x over increasing xs (null outside). */
export function interp(xs, ys, x) {
  if (!xs.length || x < xs[0] || x > xs[xs.length - 1]) return null;
  let lo = 0, hi = xs.length - 1;
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (xs[mid] <= x) lo = mid; else hi = mid; }
  if (xs[hi] === xs[lo]) return ys[lo];
  const t = (x - xs[lo]) / (xs[hi] - xs[lo]);
  return ys[lo] + t * (ys[hi] - ys[lo]);
}
