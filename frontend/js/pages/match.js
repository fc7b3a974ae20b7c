// The matching helper beside the antenna plots: pick a frequency (click any SWR, return
// loss or R/X plot, or type it) and see the L-network values that match the load there
// to the line (GET /sweeps/{id}/match from the RF tools).

import * as api from "../api.js";
import { errorBox, fill, h } from "../dom.js";
import * as fmt from "../format.js";

// Component values come in SI (henry, farad); shown in the unit a builder would use.
function component(c) {
  const kind = c.kind ?? c.type ?? c.element ?? "";
  const where = c.position ?? c.placement ?? c.role ?? "";
  let value = c.value_text ?? "";
  const v = c.value ?? c.henry ?? c.farad ?? c.value_h ?? c.value_f;
  if (!value && Number.isFinite(v)) {
    const isL = /induct|^l$/i.test(kind) || c.henry !== undefined || c.value_h !== undefined;
    value = isL ? scaled(v, "H") : scaled(v, "F");
  }
  return [where, kind, value].filter(Boolean).join(" ");
}

function scaled(v, unit) {
  const steps = [[1e-12, "p"], [1e-9, "n"], [1e-6, "µ"], [1e-3, "m"], [1, ""]];
  let best = steps[0];
  for (const s of steps) if (Math.abs(v) >= s[0]) best = s;
  return `${(v / best[0]).toPrecision(4)} ${best[1]}${unit}`;
}

function networkRow(n, i) {
  const parts = n.components ?? n.elements ?? [n.series, n.shunt].filter(Boolean);
  return h("li", {},
    h("b", {}, n.topology ?? n.name ?? `Network ${i + 1}`), ": ",
    parts.length ? parts.map(component).join(", ") : JSON.stringify(n));
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
      const nets = res.networks ?? res.solutions ?? (Array.isArray(res) ? res : []);
      const z = res.z_load ?? res.load ?? res.z ?? null;
      fill(out,
        h("p", {}, `At ${fmt.mhz(res.f_hz ?? hz, 4)} on sweep #${main.id}`,
          z && Number.isFinite(z.r ?? z.r_ohm) ? ` the load is ${fmt.impedance(z.r ?? z.r_ohm, z.x ?? z.x_ohm)}` : "", "."),
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
