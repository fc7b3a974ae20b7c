// Shared plot plumbing: loading the local plotly.js once, the common layout and config,
// band shading, the sweep palette and the "data as CSV" button beside every plot.

import { h } from "../dom.js";

let loading = null;

/** plotly.js from this server (never a CDN), loaded on the first page that plots. */
export function loadPlotly() {
  if (window.Plotly) return Promise.resolve(window.Plotly);
  if (!loading) {
    loading = new Promise((resolve, reject) => {
      const s = document.createElement("script");
      s.src = "/vendor/plotly.min.js";
      s.async = true;
      s.onload = () => resolve(window.Plotly);
      s.onerror = () => { loading = null; reject(new Error("plotly.js could not be loaded from the server")); };
      document.head.append(s);
    });
  }
  return loading;
}

export const PALETTE = ["#2f5d62", "#b0572b", "#6a5a9e", "#4d8f3a", "#9c3d6b", "#c19a2e", "#3b7ea1", "#7b6d5d"];
export const BASELINE_COLOUR = "#6b7078";

export function colourFor(index) {
  return PALETTE[index % PALETTE.length];
}

/** Plotly config: its own modebar gives "download as PNG"; no logo, responsive. */
export function config(filename) {
  return {
    responsive: true,
    displaylogo: false,
    toImageButtonOptions: { format: "png", filename, scale: 2 },
    modeBarButtonsToRemove: ["select2d", "lasso2d"],
  };
}

export function baseLayout(extra = {}) {
  return {
    margin: { l: 56, r: 16, t: 12, b: 44 },
    paper_bgcolor: "#ffffff",
    plot_bgcolor: "#ffffff",
    font: { family: "system-ui, sans-serif", size: 12, color: "#1f2a30" },
    hovermode: "closest",
    // Below the x axis title; the container-relative position keeps the two apart at
    // any plot height (phone plots are short).
    legend: { orientation: "h", x: 0, xref: "container", y: 0, yref: "container", yanchor: "bottom" },
    ...extra,
  };
}

/** Light shading for each band of interest, with its name along the top. */
export function bandShapes(bands) {
  const shapes = [];
  const annotations = [];
  for (const b of bands) {
    if (!Number.isFinite(b.low_hz) || !Number.isFinite(b.high_hz)) continue;
    shapes.push({
      type: "rect", xref: "x", yref: "paper", x0: b.low_hz / 1e6, x1: b.high_hz / 1e6, y0: 0, y1: 1,
      fillcolor: "rgba(47, 93, 98, 0.09)", line: { width: 0 }, layer: "below",
    });
    annotations.push({
      x: (b.low_hz + b.high_hz) / 2e6, y: 1, xref: "x", yref: "paper", yanchor: "bottom",
      text: b.band, showarrow: false, font: { size: 11, color: "#2f5d62" },
    });
  }
  return { shapes, annotations };
}

/** Vertical dotted lines at resonances (MHz). */
export function resonanceShapes(resonances) {
  return resonances.map((r) => ({
    type: "line", xref: "x", yref: "paper", x0: r.hz / 1e6, x1: r.hz / 1e6, y0: 0, y1: 1,
    line: { color: "#8a6a2a", width: 1, dash: "dot" },
  }));
}

function csvCell(v) {
  if (v === null || v === undefined) return "";
  const s = String(v);
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Build CSV text from a header row and rows. */
export function toCsv(header, rows) {
  return [header, ...rows].map((r) => r.map(csvCell).join(",")).join("\n") + "\n";
}

export function downloadText(filename, text, type = "text/csv") {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = h("a", { href: url, download: filename, hidden: true });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** A small "CSV" button; getCsv() is called at click time so it exports what is shown. */
export function csvButton(filename, getCsv) {
  return h("button", {
    type: "button", class: "small", title: "Download the plotted data as CSV",
    dataset: { csv: filename }, onclick: () => downloadText(filename, getCsv()),
  }, "CSV");
}

/** A titled box with a plot element and its CSV button. */
export function plotBox(title, cls, filename, getCsv, ...extra) {
  const plot = h("div", { class: ["plot", cls], role: "img", "aria-label": title });
  const box = h("section", { class: "plot-box" },
    h("header", {}, h("h3", {}, title), h("div", { class: "row" }, ...extra, csvButton(filename, getCsv))),
    plot);
  return { box, plot };
}
