// The matching helper beside the antenna plots: pick a frequency (click any SWR, return
// loss or R/X plot, or type it) and see the L-network values that match the load there
// to the line (GET /sweeps/{id}/match from the RF tools).

import * as api from "../api.js";
import { errorBox, fill, h } from "../dom.js";
import * as fmt from "../format.js";

function networkRow(n) {
  const bw = n.swr_bandwidth_2;
  return h("li", { class: "network" },
    h("b", {}, n.topology === "series_at_load" ? "Series element at the load" : "Shunt element at the load"), ": ",
    (n.elements ?? []).map((e) => e.display).join(", then "),
    bw && Number.isFinite(bw.width_hz) ? h("span", { class: "muted" }, ` — SWR≤2 over ${fmt.khz(bw.width_hz)}`) : null);
}

export function matchPanel(getMain, getPlane) {
  const input = h("input", { type: "number", step: "0.0001", min: "0", inputmode: "decimal", name: "match-mhz",
    "aria-label": "Frequency in MHz" });
  const out = h("div", { class: "match-out", "aria-live": "polite" },
    h("p", { class: "muted small" }, "Click a point on the SWR, return loss or R/X plot, or type a frequency."));

  async function compute(hz) {
    const main = getMain();
    if (!(await api.has("match"))) {
      fill(out, h("p", { class: "muted" }, "The matching helper is not available on this server yet."));
      return;
    }
    if (!main) { fill(out, h("p", { class: "muted" }, "Show a sweep first.")); return; }
    fill(out, h("p", { class: "muted" }, `Working out networks at ${fmt.mhz(hz, 4)}…`));
    try {
      const res = await api.match(main.id, hz, getPlane());
      const nets = res.networks ?? [];
      fill(out,
        h("p", {}, `At ${fmt.mhz(res.at_hz ?? hz, 4)} (sweep #${main.id}, ${res.plane}): Z = `,
          fmt.impedance(res.load_r_ohm, res.load_x_ohm), `, SWR ${fmt.swr(res.load_swr)}.`),
        res.hint ? h("p", { class: "small" }, res.hint) : null,
        nets.length ? h("ul", {}, nets.map(networkRow)) : h("p", { class: "muted" }, "No L-network needed or possible here."));
    } catch (err) {
      fill(out, err.status === 404 || err.status === 405
        ? h("p", { class: "muted" }, "The matching helper is not available on this server yet.")
        : errorBox(err));
    }
  }

  function pick(hz) {
    input.value = (hz / 1e6).toFixed(4);
    return compute(hz);
  }

  const box = h("section", { class: "plot-box" },
    h("header", {}, h("h3", {}, "Matching helper (L-network)")),
    h("form", { class: "row", onsubmit: (e) => { e.preventDefault(); if (Number(input.value) > 0) compute(Number(input.value) * 1e6); } },
      h("label", { class: "grow" }, "Frequency (MHz)", input),
      h("button", { type: "submit" }, "Match")),
    out,
    h("p", { class: "muted small" }, "Values are ideal, lossless parts; check them with an analyzer after building."));
  return { box, pick };
}
