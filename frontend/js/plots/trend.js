// Trend of one metric of one band over time: points coloured and shaped by the sweep's
// verdict, a thin verdict colour strip along the bottom (each sweep's verdict holds until
// the next sweep), events as vertical lines (storms thick and red-brown, labelled), and a
// click on a point opens that sweep.

import { VERDICT_COLOURS, VERDICT_SYMBOLS, normalVerdict } from "../verdict.js";
import { baseLayout, config, loadPlotly, toCsv } from "./common.js";

// The trend metrics of the API (mastwatch.rf.metric_table), with display scaling.
// `span` is the smallest y range drawn (absolute, or `rel` × the mean): the size of the
// change the verdict watches for (services/thresholds.py), so a healthy antenna's
// sweep-to-sweep noise looks flat instead of filling the plot like a drift. `floor` and
// `ceil` are what the metric can be (SWR ≥ 1, a fraction of the band 0–100 %): the axis
// never shows values outside them.
export const TREND_METRICS = {
  min_swr: { label: "Min SWR", unit: "", scale: 1, span: 0.5, floor: 1 },
  min_swr_hz: { label: "Frequency of min SWR", unit: "MHz", scale: 1e-6, rel: 0.015 },
  resonance: { label: "Resonance", unit: "MHz", scale: 1e-6, rel: 0.015 },
  bandwidth_2: { label: "SWR≤2 bandwidth", unit: "kHz", scale: 1e-3, rel: 0.3 },
  swr_center: { label: "SWR at band centre", unit: "", scale: 1, span: 0.5, floor: 1 },
  return_loss_center: { label: "Return loss at centre", unit: "dB", scale: 1, span: 3 },
  r_center: { label: "R at centre", unit: "Ω", scale: 1, span: 10 },
  x_center: { label: "X at centre", unit: "Ω", scale: 1, span: 10 },
  q: { label: "Q", unit: "", scale: 1, rel: 0.3 },
  usable_fraction_2: { label: "Band usable at SWR≤2", unit: "%", scale: 100, span: 25, floor: 0, ceil: 100 },
};

/** The y range to draw: the data's, widened to the metric's smallest span. */
export function trendRange(values, spec) {
  const ys = values.filter((v) => v !== null && Number.isFinite(v));
  if (!ys.length) return undefined;
  const lo = Math.min(...ys), hi = Math.max(...ys);
  const mean = ys.reduce((a, b) => a + b, 0) / ys.length;
  const least = spec.span ?? (spec.rel ? spec.rel * Math.abs(mean) : 0);
  if (!(least > 0) || hi - lo >= least) return undefined; // plotly's own autorange
  const height = 1.16 * least; // 8 % each side: room for the markers
  const floor = spec.floor ?? -Infinity, ceil = spec.ceil ?? Infinity;
  // Centred on the data, then slid (not cut) inside what the metric can be; cut only
  // when the metric's whole extent is smaller than the window.
  let bottom = (lo + hi) / 2 - height / 2;
  bottom = Math.max(Math.min(bottom, ceil - height), floor);
  return [bottom, Math.min(bottom + height, ceil)];
}

const EVENT_STYLE = {
  storm: { color: "#a8382f", width: 3, dash: "solid" },
  repair: { color: "#3d7a4f", width: 2, dash: "dash" },
  modification: { color: "#6a5a9e", width: 2, dash: "dash" },
  maintenance: { color: "#6b7078", width: 1.5, dash: "dot" },
  note: { color: "#9a958a", width: 1, dash: "dot" },
};

function eventTime(e) {
  return e.occurred_at ?? e.at ?? e.date;
}

export async function drawTrend(el, trend, { metric, statusById = {}, onOpen, filename = "trend" }) {
  const Plotly = await loadPlotly();
  const spec = TREND_METRICS[metric] ?? { label: metric, unit: "", scale: 1 };
  const pts = (trend.points ?? []).filter((p) => p.measured_at);
  const status = pts.map((p) => normalVerdict(statusById[p.sweep_id] ?? p.status));
  const x = pts.map((p) => p.measured_at);
  const y = pts.map((p) => (p.value === null || p.value === undefined ? null : p.value * spec.scale));
  const unit = spec.unit ? ` ${spec.unit}` : "";
  const range = trendRange(y, spec);
  const data = [{
    type: "scatter", mode: "lines+markers", name: spec.label, x, y,
    cliponaxis: false, // a point on the axis's end (SWR 1, 100 %) is drawn whole
    customdata: pts.map((p, i) => [p.sweep_id, status[i]]),
    line: { color: "#2f5d62", width: 1.5 },
    marker: { size: 10, color: status.map((s) => VERDICT_COLOURS[s]), symbol: status.map((s) => VERDICT_SYMBOLS[s]),
      line: { color: "#fff", width: 1 } },
    hovertemplate: `%{x|%Y-%m-%d}<br>%{y:.3f}${unit}<br>verdict %{customdata[1]}<extra>sweep %{customdata[0]}</extra>`,
  }];
  const shapes = [];
  const annotations = [];
  for (let i = 0; i < pts.length; i++) {
    const end = i + 1 < pts.length ? x[i + 1] : x[i];
    if (end === x[i]) continue;
    shapes.push({ type: "rect", xref: "x", yref: "paper", x0: x[i], x1: end, y0: 0, y1: 0.04,
      fillcolor: VERDICT_COLOURS[status[i]], opacity: 0.55, line: { width: 0 } });
  }
  for (const e of trend.events ?? []) {
    const at = eventTime(e);
    if (!at) continue;
    const style = EVENT_STYLE[e.kind] ?? EVENT_STYLE.note;
    shapes.push({ type: "line", xref: "x", yref: "paper", x0: at, x1: at, y0: 0, y1: 1, line: style });
    annotations.push({ x: at, y: 1, xref: "x", yref: "paper", yanchor: "bottom", showarrow: false,
      text: e.kind === "storm" ? "⚡ storm" : e.kind, font: { size: 11, color: style.color } });
  }
  const layout = baseLayout({
    xaxis: { type: "date", gridcolor: "#ece8df" },
    yaxis: { title: { text: `${spec.label}${spec.unit ? ` (${spec.unit})` : ""}` }, gridcolor: "#ece8df",
      ...(range ? { range, autorange: false } : {}) },
    shapes, annotations, showlegend: false, margin: { l: 60, r: 16, t: 24, b: 40 },
  });
  await Plotly.react(el, data, layout, config(filename));
  if (onOpen && !el.dataset.openBound) {
    el.dataset.openBound = "1";
    el.on("plotly_click", (ev) => {
      const p = ev.points && ev.points[0];
      if (p && p.customdata) onOpen(p.customdata[0]);
    });
  }
  return el;
}

export function trendCsv(trend, metric) {
  return toCsv(["sweep_id", "measured_at", metric],
    (trend.points ?? []).map((p) => [p.sweep_id, p.measured_at, p.value]));
}
