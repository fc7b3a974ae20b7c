// The verdict badge: a word, a colour of our own and a shape, so colour is never the only cue.
//   ok = filled circle, watch = triangle, fault = square, unknown = dashed ring.

import { h, svg } from "./dom.js";

export const VERDICTS = ["ok", "watch", "fault", "unknown"];
export const VERDICT_COLOURS = { ok: "#3d7a4f", watch: "#a86b12", fault: "#a8382f", unknown: "#6b7078" };
export const VERDICT_WORDS = { ok: "OK", watch: "Watch", fault: "Fault", unknown: "Unknown" };

export function normalVerdict(status) {
  return VERDICTS.includes(status) ? status : "unknown";
}

function shape(kind) {
  const c = VERDICT_COLOURS[kind];
  const box = { viewBox: "0 0 14 14", "aria-hidden": "true", focusable: "false" };
  switch (kind) {
    case "ok": return svg("svg", box, svg("circle", { cx: 7, cy: 7, r: 6, fill: c }));
    case "watch": return svg("svg", box, svg("path", { d: "M7 1 13 13H1Z", fill: c }));
    case "fault": return svg("svg", box, svg("rect", { x: 1.5, y: 1.5, width: 11, height: 11, fill: c }));
    default: return svg("svg", box, svg("circle", {
      cx: 7, cy: 7, r: 5.5, fill: "none", stroke: c, "stroke-width": 2, "stroke-dasharray": "2.5 2",
    }));
  }
}

export function badge(status) {
  const kind = normalVerdict(status);
  return h("span", { class: ["verdict", kind], dataset: { verdict: kind } }, shape(kind), VERDICT_WORDS[kind]);
}

/** The plotly marker symbol of a verdict, matching the badge's shape. */
export const VERDICT_SYMBOLS = { ok: "circle", watch: "triangle-up", fault: "square", unknown: "circle-open" };
