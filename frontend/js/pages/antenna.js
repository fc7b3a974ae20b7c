// The antenna page: details, feedline, baseline, events, sweep history, and the plots
// (Smith chart, SWR, return loss, R and X, trend, distance to fault) plus the matching
// helper. The latest sweep is drawn over the baseline; more sweeps are toggled on from
// the history list. `?sweep=<id>` opens the page with that sweep shown.

import * as api from "../api.js";
import { errorBox, field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";
import { bandsOf, planeArrays, reasonsOf, resonancesOf } from "../model.js";
import { BASELINE_COLOUR, colourFor, loadPlotly, plotBox } from "../plots/common.js";
import { drawDtf, dtfArrays, dtfCsv } from "../plots/dtf.js";
import { drawRect, rectCsv } from "../plots/rect.js";
import { drawSmith, smithCsv } from "../plots/smith.js";
import { TREND_METRICS, drawTrend, trendCsv } from "../plots/trend.js";
import { cautions } from "../safety.js";
import { badge } from "../verdict.js";
import { matchPanel } from "./match.js";

// Points per trace asked of the server: enough for a smooth curve, small on the wire
// (the server's decimation keeps each minimum and the band edges). With many sweeps
// overlaid each one needs fewer points: the lines are thin and the bytes add up.
export const PLOT_POINTS = 501;
export const OVERLAY_POINTS = 301;
const MANY_SWEEPS = 4;

function baselineIdOf(ant, health) {
  const b = (health && (health.baseline ?? null)) ?? ant.baseline ?? null;
  return (b && (b.sweep_id ?? b.id)) ?? health?.baseline_sweep_id ?? ant.baseline_sweep_id ?? null;
}

/** Call an optional API route only when the server has it (else null). */
async function optional(feature, call) {
  return (await api.has(feature)) ? call() : null;
}

function feedlineText(f) {
  if (!f) return "none recorded (sweeps are taken as at the feedpoint)";
  const cable = f.cable_type?.name ?? f.cable_type_name ?? f.cable ?? `cable type ${f.cable_type_id}`;
  const parts = [`${cable}, ${fmt.num(f.length_m, 2, "m")}`];
  if (f.connectors) parts.push(`${f.connectors} connector${f.connectors === 1 ? "" : "s"}`);
  return parts.join(", ");
}

/** The five strongest DTF peaks, nearest first. */
function strongest(peaks) {
  return [...peaks].sort((a, b) => b.reflection - a.reflection).slice(0, 5).sort((a, b) => a.distance_m - b.distance_m);
}

function eventsList(events) {
  if (!events.length) return h("p", { class: "muted" }, "No events recorded.");
  return h("ul", { class: "reasons events" }, events.map((e) => h("li", {},
    h("b", {}, `${fmt.date(e.occurred_at)} ${e.kind}`), ` — ${e.title ?? ""}`, e.notes ? ` (${e.notes})` : "")));
}

export async function render(root, [idText], query, isStale) {
  // plotly.js (the largest download) loads while the API calls run, not after them.
  loadPlotly().catch(() => {});
  const antennaId = Number(idText);
  const ant = await api.antenna(antennaId);
  const [site, list, health, antEvents] = await Promise.all([
    api.site(ant.site_id), api.sweeps(antennaId), optional("health", () => api.health(antennaId)),
    api.antennaEvents(antennaId).catch(() => []),
  ]);
  const siteEvents = await api.siteEvents(ant.site_id).catch(() => []);
  const events = [...antEvents, ...siteEvents.filter((e) => !e.antenna_id || e.antenna_id === antennaId)]
    .filter((e, i, all) => all.findIndex((o) => o.id === e.id) === i)
    .sort((a, b) => String(a.occurred_at).localeCompare(String(b.occurred_at)));
  const baselineId = baselineIdOf(ant, health);
  const canBaseline = await api.has("baseline");
  const latest = list[0] ?? null;
  const status = health?.status ?? latest?.status ?? "unknown";
  const reasons = reasonsOf(health).length ? reasonsOf(health) : reasonsOf(latest);

  const state = {
    plane: ant.feedline ? "feedpoint" : "measured",
    selected: new Set([latest?.id, baselineId, Number(query.get("sweep")) || null].filter(Boolean)),
  };
  // ?show=all or ?show=12,15,19 overlays those sweeps from the start.
  const show = query.get("show");
  if (show === "all") for (const s of list) state.selected.add(s.id);
  else if (show) for (const id of show.split(",").map(Number).filter(Boolean)) state.selected.add(id);
  const colourOf = new Map(list.map((s, i) => [s.id, s.id === baselineId ? BASELINE_COLOUR : colourFor(i)]));
  const dataCache = new Map();
  const sweepCache = new Map();
  const getData = (id) => {
    // A sweep already fetched at a finer resolution is kept as it is.
    const points = state.selected.size >= MANY_SWEEPS ? OVERLAY_POINTS : PLOT_POINTS;
    if (!dataCache.has(id)) dataCache.set(id, api.sweepData(id, points));
    return dataCache.get(id);
  };
  const getSweep = (id) => {
    if (!sweepCache.has(id)) sweepCache.set(id, api.sweep(id));
    return sweepCache.get(id);
  };
  const label = (s) => `${fmt.date(s.measured_at)} #${s.id}${s.id === baselineId ? " baseline" : ""}${s.id === latest?.id ? " latest" : ""}`;

  // -- header and facts ---------------------------------------------------------------
  const header = h("div", {},
    h("p", { class: "small" }, h("a", { href: "#/" }, "Status board"), " › ", h("span", {}, site.name)),
    h("div", { class: "row" }, h("h1", { class: "grow" }, ant.name), badge(status)),
    reasons.length ? h("ul", { class: "reasons" }, reasons.map((r) => h("li", {}, r))) : null,
    h("div", { class: "row" },
      h("a", { href: `#/upload?antenna=${antennaId}` }, "Upload sweeps"),
      h("a", { href: `#/compare?antenna=${antennaId}` }, "Compare two sweeps"),
      h("a", { href: `#/check/${ant.site_id}` }, "Site check"),
      h("a", { href: `#/manage/antennas?edit=${antennaId}` }, "Edit"),
      h("a", { href: api.archiveUrl(antennaId), download: "", id: "archive-link",
        title: "Every sweep file as uploaded, the sweeps and metrics as CSV, the record as JSON" },
      "Download the record (zip)")));
  const baselineSweep = list.find((s) => s.id === baselineId);
  function baselineFact() {
    const b = health?.baseline;
    if (baselineSweep) return h("span", {}, label(baselineSweep), b?.reason ? ` — ${b.reason}` : "");
    const c = health?.candidate;
    if (!c) return "none set yet";
    return h("span", {}, `none confirmed; candidate ${fmt.date(c.measured_at)} #${c.sweep_id}`, c.why ? ` (${c.why}) ` : " ",
      canBaseline ? h("button", { type: "button", class: "small", dataset: { confirmBaseline: c.sweep_id },
        onclick: () => setBaseline(c.sweep_id) }, "Confirm as baseline") : null);
  }
  const fact = (term, value) => h("div", {}, h("dt", {}, term), h("dd", {}, value));
  const facts = h("dl", { class: "facts panel" },
    fact("Site", site.name),
    fact("Kind", ant.kind),
    fact("Bands", (ant.bands ?? []).join(", ") || "—"),
    fact("Installed", ant.installed_on ?? "—"),
    fact("Feedline", feedlineText(ant.feedline)),
    fact("Baseline", baselineFact()),
    fact("Sweeps on record", String(list.length)),
    ant.notes ? fact("Notes", ant.notes) : null);

  // -- plots ---------------------------------------------------------------------------
  let shown = [];
  const smith = plotBox("Smith chart", "smith", `antenna-${antennaId}-smith.csv`, () => smithCsv(shown));
  const swr = plotBox("SWR", "", `antenna-${antennaId}-swr.csv`, () => rectCsv("swr", shown));
  const rl = plotBox("Return loss", "", `antenna-${antennaId}-return-loss.csv`, () => rectCsv("rl", shown));
  const rx = plotBox("R and X (X dotted)", "", `antenna-${antennaId}-r-x.csv`, () => rectCsv("rx", shown));
  smith.plot.id = "smith-plot";
  swr.plot.id = "swr-plot";
  const planeSel = select({ name: "plane", "aria-label": "Reference plane" },
    [["feedpoint", "At the feedpoint"], ["measured", "As measured"]], state.plane);
  const planeNote = h("p", { class: "muted small" });
  const match = matchPanel(() => shown.find((s) => s.main), () => state.plane);

  async function draw() {
    const ids = [...state.selected].filter((id) => colourOf.has(id));
    const ordered = list.filter((s) => ids.includes(s.id)).reverse(); // oldest first, latest on top
    const datas = await Promise.all(ordered.map((s) => getData(s.id)));
    if (isStale()) return;
    const mainId = ordered.length ? (ids.includes(latest?.id) ? latest.id : ordered[ordered.length - 1].id) : null;
    shown = ordered.map((s, i) => ({
      ...planeArrays(datas[i], state.plane), id: s.id, label: label(s), colour: colourOf.get(s.id),
      dash: s.id === baselineId ? "dash" : "solid", main: s.id === mainId,
    }));
    const fellBack = shown.some((s) => s.plane !== state.plane);
    planeNote.textContent = fellBack
      ? "Some sweeps have no feedpoint view (no feedline recorded): shown as measured."
      : `Shown ${state.plane === "feedpoint" ? "at the feedpoint" : "as measured"}.`;
    const mainSweep = mainId ? await getSweep(mainId) : null;
    const metricPlane = state.plane === "feedpoint" ? "feedpoint" : "measured";
    const bands = bandsOf(mainSweep, metricPlane);
    const resonances = resonancesOf(mainSweep, metricPlane);
    const opts = { bands, resonances };
    // The Smith chart first (what people look at), then the rectangular plots.
    await drawSmith(smith.plot, shown, { ...opts, filename: `antenna-${antennaId}-smith` });
    smith.plot.dataset.drawnMs = String(performance.now()); // read by tests/bench/bench_frontend.py
    await Promise.all([
      drawRect(swr.plot, "swr", shown, { ...opts, onPick: match.pick }),
      drawRect(rl.plot, "rl", shown, { ...opts, onPick: match.pick }),
      drawRect(rx.plot, "rx", shown, { ...opts, onPick: match.pick }),
    ]);
    smith.plot.dataset.traces = String(shown.length + 2);
  }
  planeSel.addEventListener("change", () => { state.plane = planeSel.value; draw().catch(showError); });

  // -- history -------------------------------------------------------------------------
  const history = h("ul", { class: "history", "aria-label": "Sweep history" });
  for (const s of list) {
    const box = h("input", { type: "checkbox", checked: state.selected.has(s.id), dataset: { sweepId: s.id },
      "aria-label": `Show sweep ${label(s)}` });
    box.addEventListener("change", () => {
      if (box.checked) state.selected.add(s.id); else state.selected.delete(s.id);
      draw().catch(showError);
    });
    history.append(h("li", { dataset: { sweepId: s.id } },
      h("label", { class: "item" }, box, h("span", { class: "swatch", style: `background:${colourOf.get(s.id)}` }),
        h("span", { class: "grow" }, label(s), h("br"),
          h("span", { class: "muted small" }, `${s.reference_plane ?? ""} · ${s.filename ?? ""}`)),
        badge(s.status)),
      h("div", { class: "row small" },
        h("a", { href: api.sweepFileUrl(s.id) }, "original file"),
        h("a", { href: api.touchstoneUrl(s.id, "feedpoint") }, "Touchstone"),
        canBaseline && s.id !== baselineId
          ? h("button", { type: "button", class: "link", onclick: () => setBaseline(s.id) }, "make baseline")
          : null,
        baselineId && s.id !== baselineId
          ? h("a", { href: `#/compare?antenna=${antennaId}&a=${baselineId}&b=${s.id}` }, "compare with baseline")
          : null)));
  }
  const message = h("div", { "aria-live": "polite" });
  function showError(err) { fill(message, errorBox(err)); }
  async function setBaseline(sweepId) {
    try {
      await api.setBaseline(antennaId, sweepId);
      window.dispatchEvent(new HashChangeEvent("hashchange"));
    } catch (err) { showError(err); }
  }

  // -- trend ---------------------------------------------------------------------------
  const statusById = Object.fromEntries(list.map((s) => [s.id, s.status]));
  const bandSel = select({ name: "trend-band", "aria-label": "Band" }, (ant.bands ?? []).map((b) => [b, b]));
  const metricSel = select({ name: "trend-metric", "aria-label": "Metric" },
    Object.entries(TREND_METRICS).map(([k, v]) => [k, v.label]), "min_swr");
  let trendData = { points: [], events: [] };
  const trend = plotBox("Trend", "", `antenna-${antennaId}-trend.csv`, () => trendCsv(trendData, metricSel.value),
    field("Band", bandSel), field("Metric", metricSel));
  trend.plot.id = "trend-plot";
  async function drawTrendNow() {
    if (!bandSel.value) { fill(trend.plot, h("p", { class: "muted" }, "No bands of interest set for this antenna.")); return; }
    trendData = await api.trend(antennaId, bandSel.value, metricSel.value);
    if (!trendData.events || !trendData.events.length) trendData = { ...trendData, events };
    await drawTrend(trend.plot, trendData, {
      metric: metricSel.value, statusById, filename: `antenna-${antennaId}-trend`,
      onOpen: (sweepId) => {
        state.selected.add(sweepId);
        const box = history.querySelector(`input[data-sweep-id="${sweepId}"]`);
        if (box) box.checked = true;
        draw().then(() => smith.box.scrollIntoView({ behavior: "smooth" })).catch(showError);
      },
    });
  }
  bandSel.addEventListener("change", () => drawTrendNow().catch(showError));
  metricSel.addEventListener("change", () => drawTrendNow().catch(showError));

  // -- distance to fault ---------------------------------------------------------------
  // The transform places a fault only on a wide enough sweep: mastwatch.rf.dtf wants a
  // resolution cell VF·c/(2·span) of at most 10 m, 32 points or more, the phase, and a
  // velocity factor (from the feedline on record). Sweeps that pass are drawn at once;
  // for others the page says why and offers to ask the server anyway.
  const C0 = 299792458;
  const dtfCell = (s) => {
    const vf = s?.feedline_snapshot?.velocity_factor;
    return vf ? (vf * C0) / (2 * (s.f_stop_hz - s.f_start_hz)) : null;
  };
  const dtfPossible = (s) => Boolean(s && s.has_phase && s.points >= 32 && dtfCell(s) !== null && dtfCell(s) <= 10);
  let dtfNow = null, dtfBase = null;
  const dtfBox = plotBox("Distance to fault", "small", `antenna-${antennaId}-dtf.csv`, () => (dtfNow ? dtfCsv(dtfNow, dtfBase) : ""));
  dtfBox.box.classList.add("hidden");
  const dtfNote = h("div", { class: "muted small", "aria-live": "polite" });
  async function drawDtfNow() {
    try {
      // Show the line and a little beyond its far end (where an open or a load shows);
      // the server compensates the cable's loss only that far (rf/dtf.py).
      const length = latest.feedline_snapshot?.length_m;
      const maxM = length ? 1.5 * length + 5 : Infinity;
      const view = Number.isFinite(maxM) ? { max_distance_m: maxM.toFixed(1) } : {};
      const cur = await api.dtf(latest.id, view);
      const base = baselineId && baselineId !== latest.id && dtfPossible(baselineSweep)
        ? await api.dtf(baselineId, view).catch(() => null) : null;
      dtfNow = dtfArrays(cur, maxM);
      dtfBase = base ? dtfArrays(base, maxM) : null;
      dtfBox.box.classList.remove("hidden");
      await drawDtf(dtfBox.plot, dtfNow, dtfBase, { filename: `antenna-${antennaId}-dtf`, lineEndM: length ?? null });
      fill(dtfNote, `Latest sweep${dtfBase ? " against the baseline's" : ""}; resolution about ${fmt.num(dtfNow.resolution, 2, "m")}. `,
        dtfNow.peaks.length ? `Strongest reflections at ${strongest(dtfNow.peaks).map((p) => fmt.num(p.distance_m, 1, "m")).join(", ")}. ` : "No reflection above the threshold. ",
        // the server's notes are clauses ("loss compensated with …"): each a sentence here
        ...dtfNow.notes.map((n) => h("span", {}, `${n.charAt(0).toUpperCase()}${n.slice(1)}${/[.!?]$/.test(n) ? "" : "."} `)));
    } catch (err) {
      dtfBox.box.classList.add("hidden");
      fill(dtfNote, `Distance to fault cannot be computed for this sweep: ${err.message}`);
    }
  }
  async function setupDtf() {
    if (!latest) { dtfNote.textContent = "No sweep yet."; return; }
    if (!(await api.has("dtf"))) { dtfNote.textContent = "Distance to fault is not available on this server yet."; return; }
    if (dtfPossible(latest)) { await drawDtfNow(); return; }
    const cell = dtfCell(latest);
    const why = cell === null
      ? "no feedline is on record for this sweep, so its velocity factor is unknown"
      : `the latest sweep spans ${fmt.khz(latest.f_stop_hz - latest.f_start_hz)}, a resolution cell of ${fmt.num(cell, 1, "m")}; a fault is placed with a cell of 10 m or less (a wider sweep)`;
    fill(dtfNote, `No distance-to-fault view: ${why}. `,
      h("button", { type: "button", class: "small", onclick: () => drawDtfNow() }, "Try anyway"));
  }

  fill(root,
    header,
    status === "fault" ? cautions("This antenna shows a fault: before anyone goes to look") : null,
    facts,
    message,
    h("div", { class: "two-col" },
      smith.box,
      h("section", { class: "panel" },
        h("h2", {}, "Sweeps"),
        field("Plane", planeSel), planeNote,
        list.length ? history : h("p", { class: "muted" }, "No sweeps yet: ", h("a", { href: `#/upload?antenna=${antennaId}` }, "upload the first"), "."))),
    h("div", { class: "plots" }, swr.box, rl.box, rx.box, match.box),
    h("h2", {}, "Over time"),
    h("div", { class: "plots" }, trend.box),
    h("h2", {}, "Events"),
    h("div", { class: "panel" }, eventsList(events)),
    h("h2", {}, "Distance to fault"),
    h("div", { class: "plots" }, h("div", { id: "dtf" }, dtfBox.box, dtfNote,
      cautions("A reflection along the line is a reason to inspect, carefully"))),
  );
  if (list.length) await draw();
  else smith.plot.append(h("p", { class: "muted" }, "Nothing to plot yet."));
  await Promise.all([drawTrendNow().catch(showError), setupDtf()]);
}
