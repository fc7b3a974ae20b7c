// Distance to fault: reflection magnitude against distance along the line, for a sweep
// and for the baseline's, so a new bump (a wet connector, a crushed cable) stands out.

import { BASELINE_COLOUR, baseLayout, config, loadPlotly, toCsv } from "./common.js";

/**
 * The distance axis (m), |ρ| in dB and the peaks of a GET /sweeps/{id}/dtf answer, cut at
 * `maxM` metres: past the line's far end a loss-compensated trace only amplifies noise.
 */
export function dtfArrays(body, maxM = Infinity) {
  const all = body.distance_m ?? [];
  const n = all.findIndex((d) => d > maxM);
  const end = n < 0 ? all.length : n;
  const d = all.slice(0, end);
  const y = (body.reflection ?? []).slice(0, end).map((m) => (m > 0 ? 20 * Math.log10(m) : null));
  const peaks = (body.peaks ?? []).filter((p) => p.distance_m <= maxM);
  return { d, y, peaks, resolution: body.resolution_m, notes: body.notes ?? [], safety: body.safety };
}

export async function drawDtf(el, current, baseline, { filename = "dtf", lineEndM = null } = {}) {
  const Plotly = await loadPlotly();
  const traces = [];
  if (baseline) {
    traces.push({ type: "scatter", mode: "lines", name: "baseline", x: baseline.d, y: baseline.y,
      line: { color: BASELINE_COLOUR, dash: "dash", width: 1.4 },
      hovertemplate: "%{x:.2f} m<br>%{y:.1f} dB<extra>baseline</extra>" });
  }
  traces.push({ type: "scatter", mode: "lines", name: "this sweep", x: current.d, y: current.y,
    line: { color: "#2f5d62", width: 2 }, hovertemplate: "%{x:.2f} m<br>%{y:.1f} dB<extra>this sweep</extra>" });
  const px = current.peaks.map((p) => p.distance_m ?? p.d).filter(Number.isFinite);
  // A peak's |ρ| in dB (negative of its return loss), on the same scale as the trace.
  const py = current.peaks.map((p) => (p.reflection > 0 ? 20 * Math.log10(p.reflection) : null));
  if (px.length) {
    traces.push({ type: "scatter", mode: "markers", name: "reflections", x: px, y: py,
      marker: { symbol: "triangle-down", size: 10, color: "#a8382f" },
      hovertemplate: "reflection at %{x:.2f} m<br>%{y:.1f} dB<extra></extra>" });
  }
  const ends = Number.isFinite(lineEndM) ? {
    shapes: [{ type: "line", xref: "x", yref: "paper", x0: lineEndM, x1: lineEndM, y0: 0, y1: 1,
      line: { color: "#6b7078", width: 1, dash: "dot" } }],
    annotations: [{ x: lineEndM, y: 1, xref: "x", yref: "paper", yanchor: "bottom", showarrow: false,
      text: `line end (${lineEndM.toFixed(1)} m on record)`, font: { size: 11, color: "#55616a" } }],
  } : {};
  const layout = baseLayout({
    ...ends,
    margin: { l: 56, r: 16, t: 22, b: 68 },
    xaxis: { title: { text: "Distance along the line (m)" }, gridcolor: "#ece8df" },
    yaxis: { title: { text: "Reflection (dB)" }, gridcolor: "#ece8df" },
  });
  await Plotly.react(el, traces, layout, config(filename));
}

export function dtfCsv(current, baseline) {
  const rows = current.d.map((d, i) => [d, current.y[i], baseline ? baseline.y[i] ?? "" : ""]);
  return toCsv(["distance_m", "this_sweep_db", "baseline_db"], rows);
}
