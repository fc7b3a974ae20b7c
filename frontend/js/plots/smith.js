// The Smith chart (plotly `scattersmith`: real = R/z0, imag = X/z0) of overlaid sweeps,
// with band edges and resonances marked. Hover shows frequency (MHz), R + jX Ω and SWR.
//
// Traces, in order: one per series (the caller's order), then "band edges", then
// "resonances" (these two are always present so the count is predictable).

import * as fmt from "../format.js";
import { interp } from "../model.js";
import { baseLayout, config, loadPlotly, toCsv } from "./common.js";

function hoverText(s, i) {
  return `${(s.freq[i] / 1e6).toFixed(4)} MHz<br>Z = ${fmt.impedance(s.r[i], s.x[i])}<br>SWR ${fmt.swr(s.swr[i])}`;
}

export function seriesTrace(s) {
  const n = Math.min(s.freq.length, s.r.length);
  const real = [], imag = [], text = [];
  for (let i = 0; i < n; i++) {
    real.push(s.r[i] / s.z0);
    imag.push(s.x[i] / s.z0);
    text.push(hoverText(s, i));
  }
  return {
    type: "scattersmith", mode: "lines", name: s.label, real, imag, text,
    hovertemplate: "%{text}<extra>%{fullData.name}</extra>",
    line: { color: s.colour, width: s.main ? 2.4 : 1.5, dash: s.dash ?? "solid" },
  };
}

/** Points of the main series at band edges (interpolated) and at its resonances. */
function markerTraces(main, bands, resonances) {
  const edges = { real: [], imag: [], text: [] };
  const res = { real: [], imag: [], text: [] };
  if (main) {
    const add = (into, hz, label) => {
      const r = interp(main.freq, main.r, hz);
      const x = interp(main.freq, main.x, hz);
      if (r === null || x === null) return;
      into.real.push(r / main.z0);
      into.imag.push(x / main.z0);
      into.text.push(`${label}<br>${(hz / 1e6).toFixed(4)} MHz<br>Z = ${fmt.impedance(r, x)}`);
    };
    for (const b of bands) {
      add(edges, b.low_hz, `${b.band} lower edge`);
      add(edges, b.high_hz, `${b.band} upper edge`);
    }
    for (const r of resonances) add(res, r.hz, `${r.kind ?? ""} resonance`.trim());
  }
  return [
    { type: "scattersmith", mode: "markers", name: "band edges", ...edges, hovertemplate: "%{text}<extra></extra>",
      marker: { symbol: "diamond", size: 9, color: "#2f5d62", line: { color: "#fff", width: 1 } } },
    { type: "scattersmith", mode: "markers", name: "resonances", ...res, hovertemplate: "%{text}<extra></extra>",
      marker: { symbol: "x", size: 9, color: "#8a6a2a" } },
  ];
}

export async function drawSmith(el, series, { bands = [], resonances = [], filename = "smith", compact = false } = {}) {
  const Plotly = await loadPlotly();
  const main = series.find((s) => s.main) ?? series[0];
  const traces = [...series.map(seriesTrace), ...markerTraces(main, bands, resonances)];
  const layout = baseLayout({
    margin: { l: 20, r: 20, t: 20, b: 20 },
    smith: { realaxis: { gridcolor: "#d8d4ca" }, imaginaryaxis: { gridcolor: "#d8d4ca" }, bgcolor: "#fdfcf9" },
    legend: { orientation: "h", y: -0.05, x: 0 },
    showlegend: !compact,
  });
  if (compact) layout.margin = { l: 8, r: 8, t: 8, b: 8 };
  await Plotly.react(el, traces, layout, config(filename));
  return el;
}

/** CSV of the plotted impedances: one block of rows per series. */
export function smithCsv(series) {
  const rows = [];
  for (const s of series) {
    for (let i = 0; i < s.freq.length; i++) rows.push([s.label, s.freq[i], s.r[i], s.x[i], s.swr[i]]);
  }
  return toCsv(["sweep", "freq_hz", "r_ohm", "x_ohm", "swr"], rows);
}
