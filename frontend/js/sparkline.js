// A tiny inline-SVG sparkline of min SWR over time (no plotly on the board: it stays light).
// The y range follows the data with at least 0.5 of SWR span, so drift shows without
// exaggerating noise; the dashed line is SWR 2 when it falls inside the range. An
// infinite SWR (null) is drawn at the top.

import { h, svg } from "./dom.js";

const W = 240;
const H = 36;

export function sparkline(points, label) {
  const pts = points.filter((p) => p.t).map((p) => ({ t: new Date(p.t).getTime(), v: p.v }))
    .filter((p) => Number.isFinite(p.t)).sort((a, b) => a.t - b.t);
  if (pts.length < 2) return h("p", { class: "muted small" }, pts.length ? "One sweep so far" : "No trend yet");
  const finite = pts.map((p) => p.v).filter((v) => Number.isFinite(v));
  const lo = Math.max(1, Math.min(...finite, 2) - 0.15);
  const hi = Math.max(lo + 0.5, Math.max(...finite, lo) + 0.15);
  const y = (v) => (Number.isFinite(v) ? H - 3 - ((Math.min(v, hi) - lo) / (hi - lo)) * (H - 6) : 3);
  const t0 = pts[0].t;
  const span = pts[pts.length - 1].t - t0 || 1;
  const x = (t) => 3 + ((t - t0) / span) * (W - 6);
  const d = pts.map((p, i) => `${i ? "L" : "M"}${x(p.t).toFixed(1)} ${y(p.v).toFixed(1)}`).join(" ");
  const last = pts[pts.length - 1];
  return svg("svg", { class: "spark", viewBox: `0 0 ${W} ${H}`, preserveAspectRatio: "none", role: "img",
    "aria-label": label },
  svg("title", {}, label),
  hi >= 2 && lo <= 2 ? svg("line", { x1: 0, x2: W, y1: y(2), y2: y(2) }) : null,
  svg("path", { d }),
  svg("circle", { cx: x(last.t), cy: y(last.v), r: 2.5 }));
}
