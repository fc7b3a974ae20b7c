// Rectangular plots against frequency (MHz on the axis, Hz in the data): SWR, return
// loss, and R and X, for the same overlaid sweeps as the Smith chart, with the band plan
// shaded and resonances as dotted lines. Clicking a point reports its frequency (the
// matching helper uses that).

import { baseLayout, bandShapes, config, loadPlotly, resonanceShapes, toCsv } from "./common.js";

export const KINDS = {
  swr: { title: "SWR", y: "SWR", filename: "swr" },
  rl: { title: "Return loss", y: "Return loss (dB)", filename: "return-loss" },
  rx: { title: "R and X", y: "Ω", filename: "r-x" },
};

function mhz(freq) {
  return freq.map((f) => f / 1e6);
}

function traces(kind, series) {
  const out = [];
  for (const s of series) {
    const x = mhz(s.freq);
    const line = { color: s.colour, width: s.main ? 2.2 : 1.4, dash: s.dash ?? "solid" };
    if (kind === "swr") {
      out.push({ type: "scatter", mode: "lines", name: s.label, x, y: s.swr, line,
        hovertemplate: "%{x:.4f} MHz<br>SWR %{y:.2f}<extra>%{fullData.name}</extra>" });
    } else if (kind === "rl") {
      out.push({ type: "scatter", mode: "lines", name: s.label, x, y: s.rl, line,
        hovertemplate: "%{x:.4f} MHz<br>RL %{y:.1f} dB<extra>%{fullData.name}</extra>" });
    } else {
      out.push({ type: "scatter", mode: "lines", name: `R ${s.label}`, x, y: s.r, line,
        hovertemplate: "%{x:.4f} MHz<br>R %{y:.2f} Ω<extra></extra>" });
      out.push({ type: "scatter", mode: "lines", name: `X ${s.label}`, x, y: s.x,
        line: { ...line, dash: "dot" }, hovertemplate: "%{x:.4f} MHz<br>X %{y:.2f} Ω<extra></extra>" });
    }
  }
  return out;
}

// On a phone the legend would crowd a short plot: it is left out there (the sweep
// history beside the plots shows each sweep's colour, and hover names every trace).
const isPhone = () => window.innerWidth < 760;

/** Rows a legend below the plot takes (about three entries per row on a desk). */
function legendRows(kind, series) {
  if (isPhone()) return 0;
  return Math.ceil((series.length * (kind === "rx" ? 2 : 1)) / 3);
}

function yaxis(kind, series) {
  if (kind === "swr") {
    let top = 1.5;
    for (const s of series) for (const v of s.swr) if (v !== null && v > top) top = v;
    return { title: { text: "SWR" }, range: [1, Math.min(top * 1.05, 10)], gridcolor: "#ece8df" };
  }
  return { title: { text: KINDS[kind].y }, gridcolor: "#ece8df", zeroline: kind === "rx" };
}

export async function drawRect(el, kind, series, { bands = [], resonances = [], filename, onPick } = {}) {
  const Plotly = await loadPlotly();
  const { shapes, annotations } = bandShapes(bands);
  if (kind === "swr") {
    shapes.push({ type: "line", xref: "paper", x0: 0, x1: 1, yref: "y", y0: 2, y1: 2,
      line: { color: "#a86b12", width: 1, dash: "dash" } });
  }
  shapes.push(...resonanceShapes(resonances));
  const layout = baseLayout({
    xaxis: { title: { text: "Frequency (MHz)" }, gridcolor: "#ece8df" },
    yaxis: yaxis(kind, series),
    shapes, annotations,
    margin: { l: 56, r: 16, t: 22, b: 48 + 20 * legendRows(kind, series) },
    showlegend: !isPhone(),
  });
  await Plotly.react(el, traces(kind, series), layout, config(filename ?? KINDS[kind].filename));
  if (onPick && !el.dataset.pickBound) {
    el.dataset.pickBound = "1";
    el.on("plotly_click", (ev) => {
      const p = ev.points && ev.points[0];
      if (p && Number.isFinite(p.x)) onPick(p.x * 1e6);
    });
  }
  return el;
}

export function rectCsv(kind, series) {
  const rows = [];
  for (const s of series) {
    for (let i = 0; i < s.freq.length; i++) {
      if (kind === "swr") rows.push([s.label, s.freq[i], s.swr[i]]);
      else if (kind === "rl") rows.push([s.label, s.freq[i], s.rl[i]]);
      else rows.push([s.label, s.freq[i], s.r[i], s.x[i]]);
    }
  }
  const head = { swr: ["swr"], rl: ["return_loss_db"], rx: ["r_ohm", "x_ohm"] }[kind];
  return toCsv(["sweep", "freq_hz", ...head], rows);
}
