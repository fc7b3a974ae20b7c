// The compare page: any two sweeps of one antenna, side by side (a Smith chart each) and
// overlaid (SWR and R/X), with the per-band metric differences (B − A).
// Query: ?antenna=<id>&a=<sweep id>&b=<sweep id>; defaults: the two latest sweeps.

import * as api from "../api.js";
import { field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";
import { bandRows, bandsOf, bestPlane, planeArrays } from "../model.js";
import { colourFor, downloadText, loadPlotly, plotBox, toCsv } from "../plots/common.js";
import { drawRect, rectCsv } from "../plots/rect.js";
import { drawSmith, smithCsv } from "../plots/smith.js";
import { badge } from "../verdict.js";
import { PLOT_POINTS } from "./antenna.js";

// Rows of the difference table: metric field, label, display of a value (with its band's
// row, for what "null" means there), of a difference.
const ROWS = [
  ["min_swr", "Min SWR", (v, row) => fmt.minSwrInBand({ ...row, min_swr: v }), (d) => signed(d, 2)],
  ["min_swr_hz", "Frequency of min SWR", (v) => fmt.mhz(v), signedHz],
  ["resonance_hz", "Resonance", (v) => fmt.mhz(v), signedHz],
  ["swr_center", "SWR at band centre", (v, row) => fmt.swrAtCentre({ ...row, swr_center: v }), (d) => signed(d, 2)],
  ["bandwidth_2_hz", "SWR≤2 bandwidth", (v) => fmt.khz(v), signedHz],
  ["usable_fraction_2", "Band usable at SWR≤2", (v) => pct(v), (d) => signed(d === null ? null : d * 100, 0, " %")],
  ["return_loss_center_db", "Return loss at centre", (v) => fmt.num(v, 1, "dB"), (d) => signed(d, 1, " dB")],
  ["r_center_ohm", "R at centre", (v) => fmt.num(v, 1, "Ω"), (d) => signed(d, 1, " Ω")],
  ["x_center_ohm", "X at centre", (v) => fmt.num(v, 1, "Ω"), (d) => signed(d, 1, " Ω")],
  ["q", "Q", (v) => fmt.num(v, 1), (d) => signed(d, 1)],
];

function pct(v) {
  return Number.isFinite(v) ? `${Math.round(v * 100)} %` : "—";
}

function signed(d, digits, unit = "") {
  if (d === null || d === undefined || !Number.isFinite(d)) return "—";
  const shown = Math.abs(d).toFixed(digits);
  const zero = Number(shown) === 0;
  return `${zero ? "±" : d > 0 ? "+" : "−"}${shown}${unit}`;
}

/** A frequency difference in kHz (or MHz when large), with its sign. */
function signedHz(d) {
  if (d === null || d === undefined || !Number.isFinite(d)) return "—";
  return Math.abs(d) >= 1e6 ? signed(d / 1e6, 3, " MHz") : signed(d / 1e3, 1, " kHz");
}

function diffTable(a, b, plane) {
  const ra = new Map(bandRows(a, plane).map((r) => [r.band, r]));
  const rb = new Map(bandRows(b, plane).map((r) => [r.band, r]));
  const bands = [...new Set([...ra.keys(), ...rb.keys()])];
  if (!bands.length) return { el: h("p", { class: "muted" }, "Neither sweep covers a band of interest."), rows: [] };
  const csvRows = [];
  const tables = bands.map((band) => {
    const x = ra.get(band) ?? {};
    const y = rb.get(band) ?? {};
    return h("div", { class: "table-wrap" }, h("h3", {}, band), h("table", { class: "diff" },
      h("thead", {}, h("tr", {}, h("th", {}, "Metric"), h("th", { class: "num" }, `A #${a.id}`),
        h("th", { class: "num" }, `B #${b.id}`), h("th", { class: "num" }, "B − A"))),
      h("tbody", {}, ROWS.map(([key, label, show, showDiff]) => {
        const va = x[key] ?? null;
        const vb = y[key] ?? null;
        const d = Number.isFinite(va) && Number.isFinite(vb) ? vb - va : null;
        csvRows.push([band, key, va, vb, d]);
        return h("tr", { dataset: { metric: key } }, h("td", {}, label), h("td", { class: "num" }, show(va, x)),
          h("td", { class: "num" }, show(vb, y)), h("td", { class: "num" }, showDiff(d)));
      }))));
  });
  return { el: h("div", {}, tables), rows: csvRows };
}

export async function render(root, _params, query) {
  // plotly.js (the largest download) loads while the API calls run, not after them.
  loadPlotly().catch(() => {});
  const [sites, antennas] = await Promise.all([api.sites(), api.antennas()]);
  const siteName = new Map(sites.map((s) => [s.id, s.name]));
  const antennaId = Number(query.get("antenna")) || antennas[0]?.id;
  const antSel = select({ name: "antenna", "aria-label": "Antenna" },
    antennas.map((a) => [a.id, `${siteName.get(a.site_id) ?? ""} — ${a.name}`]), antennaId);
  antSel.addEventListener("change", () => { window.location.hash = `#/compare?antenna=${antSel.value}`; });
  if (!antennaId) {
    fill(root, h("h1", {}, "Compare two sweeps"), h("p", { class: "panel" }, "No antennas yet."));
    return;
  }
  const list = await api.sweeps(antennaId);
  const head = [h("h1", {}, "Compare two sweeps"), h("form", { class: "panel row", onsubmit: (e) => e.preventDefault() }, field("Antenna", antSel))];
  if (list.length < 2) {
    fill(root, ...head, h("p", { class: "panel" }, "This antenna needs at least two sweeps to compare."));
    return;
  }
  const aId = Number(query.get("a")) || list[1].id;
  const bId = Number(query.get("b")) || list[0].id;
  const opts = list.map((s) => [s.id, `${fmt.date(s.measured_at)} #${s.id}`]);
  const aSel = select({ name: "a", "aria-label": "Sweep A" }, opts, aId);
  const bSel = select({ name: "b", "aria-label": "Sweep B" }, opts, bId);
  const go = () => { window.location.hash = `#/compare?antenna=${antennaId}&a=${aSel.value}&b=${bSel.value}`; };
  aSel.addEventListener("change", go);
  bSel.addEventListener("change", go);

  const [a, b, da, db] = await Promise.all([api.sweep(aId), api.sweep(bId), api.sweepData(aId, PLOT_POINTS), api.sweepData(bId, PLOT_POINTS)]);
  const plane = bestPlane(a) === "feedpoint" && bestPlane(b) === "feedpoint" ? "feedpoint" : "measured";
  const sa = { ...planeArrays(da, plane), id: a.id, label: `A ${fmt.date(a.measured_at)} #${a.id}`, colour: colourFor(2), dash: "dash" };
  const sb = { ...planeArrays(db, plane), id: b.id, label: `B ${fmt.date(b.measured_at)} #${b.id}`, colour: colourFor(0), main: true };
  const diffs = diffTable(a, b, plane);
  const smithA = plotBox(`A: ${fmt.date(a.measured_at)}`, "smith", `compare-${a.id}-smith.csv`, () => smithCsv([sa]), badge(a.status));
  const smithB = plotBox(`B: ${fmt.date(b.measured_at)}`, "smith", `compare-${b.id}-smith.csv`, () => smithCsv([sb]), badge(b.status));
  const swr = plotBox("SWR, overlaid", "", `compare-${a.id}-${b.id}-swr.csv`, () => rectCsv("swr", [sa, sb]));
  const rx = plotBox("R and X, overlaid (X dotted)", "", `compare-${a.id}-${b.id}-r-x.csv`, () => rectCsv("rx", [sa, sb]));
  swr.plot.id = "compare-swr";

  fill(root, ...head,
    h("form", { class: "panel row", onsubmit: (e) => e.preventDefault() }, field("Sweep A", aSel), field("Sweep B", bSel),
      h("a", { href: `#/antenna/${antennaId}` }, "Antenna page")),
    h("p", { class: "muted small" }, `Compared ${plane === "feedpoint" ? "at the feedpoint" : "as measured"}.`),
    h("div", { class: "side" }, smithA.box, smithB.box),
    h("div", { class: "plots" }, swr.box, rx.box),
    h("section", { class: "panel", id: "metric-differences" },
      h("div", { class: "row" }, h("h2", { class: "grow" }, "Metric differences (B − A)"),
        h("button", { type: "button", class: "small", dataset: { csv: "differences" }, onclick: () => downloadText(`compare-${a.id}-${b.id}.csv`,
          toCsv(["band", "metric", "a", "b", "b_minus_a"], diffs.rows)) }, "CSV")),
      diffs.el));
  const bands = bandsOf(b, plane);
  await Promise.all([
    drawSmith(smithA.plot, [{ ...sa, main: true }], { bands, filename: `sweep-${a.id}-smith` }),
    drawSmith(smithB.plot, [sb], { bands, filename: `sweep-${b.id}-smith` }),
    drawRect(swr.plot, "swr", [sa, sb], { bands, filename: `compare-${a.id}-${b.id}-swr` }),
    drawRect(rx.plot, "rx", [sa, sb], { bands, filename: `compare-${a.id}-${b.id}-r-x` }),
  ]);
}
