// The upload page: drop one or many sweep files (or choose them); each gets an instant
// preview from POST /analyze (metrics and a small Smith chart) before anything is stored.
// Per file: antenna, date and time (from the file when it holds one, else now), plane,
// conditions; then "Save" uploads it with a progress bar. The answer says whether the
// sweep is new (201) or the same file was already on record (200). A bad file shows the
// server's reason and line beside it. Offline, files wait on this device ("send pending").

import * as api from "../api.js";
import { errorBox, field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";
import { bandRows, planeArrays, resonancesOf } from "../model.js";
import { loadPlotly } from "../plots/common.js";
import { drawSmith } from "../plots/smith.js";
import * as offline from "../offline.js";

const PLANES = [["feedpoint", "At the feedpoint"], ["line_input", "At the radio end of the feedline"]];

function antennaOptions(sites, antennas) {
  const opts = [["", "Choose an antenna…"]];
  for (const s of sites) {
    for (const a of antennas.filter((x) => x.site_id === s.id)) opts.push([a.id, `${s.name} — ${a.name}`]);
  }
  return opts;
}

function metricsTable(result) {
  const plane = result.metrics.feedpoint ? "feedpoint" : "measured";
  const pm = result.metrics[plane];
  const rows = bandRows(result, plane);
  const res = resonancesOf(result, plane);
  return h("div", {},
    h("p", { class: "small" },
      `${result.file_format ?? "file"}, ${result.points} points, ${fmt.mhz(pm.f_start_hz)} – ${fmt.mhz(pm.f_stop_hz)}. `,
      `Min SWR ${fmt.swr(pm.min_swr)} at ${fmt.mhz(pm.min_swr_hz)}`,
      res.length ? `; resonance${res.length > 1 ? "s" : ""} ${res.map((r) => fmt.mhz(r.hz)).join(", ")}` : "",
      result.feedline && plane === "feedpoint" ? " (at the feedpoint, feedline taken out)" : "", "."),
    rows.length ? h("div", { class: "table-wrap" }, h("table", {},
      h("thead", {}, h("tr", {}, h("th", {}, "Band"), h("th", { class: "num" }, "Min SWR"),
        h("th", { class: "num" }, "SWR at centre"), h("th", { class: "num" }, "SWR≤2 width"))),
      h("tbody", {}, rows.map((b) => h("tr", {}, h("td", {}, b.band), h("td", { class: "num" }, fmt.minSwrInBand(b)),
        h("td", { class: "num" }, fmt.swrAtCentre(b)), h("td", { class: "num" }, fmt.khz(b.bandwidth_2_hz))))))) : null,
    result.metrics.feedpoint_note ? h("p", { class: "muted small" }, result.metrics.feedpoint_note) : null);
}

class FileItem {
  constructor(file, ctx) {
    this.file = file;
    this.ctx = ctx;
    this.preview = null;
    this.done = false;
    this.antenna = select({ name: "antenna", "aria-label": "Antenna" }, ctx.antennaOptions, ctx.defaults.antenna.value);
    this.when = h("input", { type: "datetime-local", name: "measured_at", value: fmt.localInput(), "aria-label": "Measured at" });
    this.plane = select({ name: "reference_plane", "aria-label": "Reference plane" }, PLANES, ctx.defaults.plane.value);
    this.conditions = h("input", { type: "text", name: "conditions", value: ctx.defaults.conditions.value, "aria-label": "Conditions" });
    this.state = h("p", { class: "file-state", "aria-live": "polite" }, "Reading…");
    this.progress = h("progress", { max: 1, value: 0, class: "hidden" });
    this.info = h("div", { class: "preview" });
    this.smith = h("div", { class: "plot small smith-preview", role: "img", "aria-label": `Smith chart preview of ${file.name}` });
    this.save = h("button", { type: "button", class: "primary", disabled: true, onclick: () => this.upload() }, "Save");
    this.remove = h("button", { type: "button", onclick: () => this.detach() }, "Remove");
    this.el = h("article", { class: "file-card", dataset: { file: file.name } },
      h("header", {}, h("span", { class: "fname" }, file.name), h("span", { class: "muted small" }, fmt.bytes(file.size))),
      this.state, this.progress,
      h("div", { class: "file-body" },
        h("div", {}, this.info,
          h("div", { class: "row" }, field("Antenna", this.antenna), field("Measured at", this.when),
            field("Plane", this.plane), field("Conditions", this.conditions)),
          h("div", { class: "row" }, this.save, this.remove)),
        this.smith));
    this.when.addEventListener("input", () => { this.when.dataset.touched = "1"; });
    this.antenna.addEventListener("change", () => this.analyze());
    this.plane.addEventListener("change", () => this.analyze());
  }

  setState(text, cls = "") {
    this.state.textContent = text;
    this.state.className = `file-state ${cls}`;
  }

  detach() {
    this.el.remove();
    this.ctx.items.delete(this);
  }

  async analyze() {
    if (this.done) return;
    this.setState("Previewing…");
    this.save.disabled = true;
    try {
      const result = await api.analyze(this.file, this.previewFields());
      this.preview = result;
      if (result.measured_at && !this.when.dataset.touched) this.when.value = fmt.localInput(new Date(result.measured_at));
      fill(this.info, metricsTable(result));
      this.setState(result.measured_at ? "Preview ready (date and time from the file)." : "Preview ready.", "previewed");
      this.save.disabled = false;
      const plane = result.preview.feedpoint ? "feedpoint" : "measured";
      const arrays = planeArrays(result.preview, plane);
      if (result.has_phase) {
        await drawSmith(this.smith, [{ ...arrays, label: this.file.name.slice(0, 40), colour: "#2f5d62", main: true }],
          { compact: true, filename: "preview" });
      } else {
        fill(this.smith, h("p", { class: "muted small" }, "SWR-only file: no Smith chart (no phase)."));
      }
    } catch (err) {
      this.preview = null;
      this.setState(err.offline ? "Offline: no preview, but the file can wait on this device." : "This file cannot be read.", "failed");
      fill(this.info, errorBox(err));
      this.save.disabled = !err.offline;
    }
  }

  /** The antenna's band plan and, for a line-input sweep, its feedline, for the preview. */
  previewFields() {
    const a = this.ctx.antennaById.get(Number(this.antenna.value));
    // The band plan of the antenna's site; with no antenna chosen yet, the server's default.
    const site = a ? this.ctx.siteById.get(a.site_id) : undefined;
    const out = { reference_plane: this.plane.value, itu_region: site?.itu_region };
    if (this.plane.value === "line_input" && a?.feedline) {
      Object.assign(out, { cable_type_id: a.feedline.cable_type.id, length_m: a.feedline.length_m,
        connectors: a.feedline.connectors });
    }
    return out;
  }

  fields() {
    const when = this.when.value ? new Date(this.when.value) : new Date();
    return {
      measured_at: when.toISOString(),
      reference_plane: this.plane.value,
      conditions: this.conditions.value,
      operator: this.ctx.defaults.operator.value,
      notes: this.ctx.defaults.notes.value,
    };
  }

  /** Upload this file; resolves "saved", "kept" (offline), "needs-token" or "failed". */
  async upload() {
    const antennaId = this.antenna.value;
    if (!antennaId) { this.setState("Choose the antenna first.", "failed"); this.antenna.focus(); return "failed"; }
    this.save.disabled = true;
    this.progress.classList.remove("hidden");
    this.progress.value = 0;
    this.setState("Uploading…");
    try {
      const { status, body } = await api.upload(antennaId, this.file, this.fields(), (p) => { this.progress.value = p; });
      this.progress.value = 1;
      this.done = true;
      const link = h("a", { href: `#/antenna/${antennaId}?sweep=${body.id}` }, `sweep #${body.id}`);
      if (status === 200 || body.duplicate) {
        fill(this.state, "Already on record: the same file is ", link, " (nothing new stored).");
        this.state.className = "file-state duplicate";
      } else {
        fill(this.state, "Saved as ", link, body.status ? ` — verdict ${body.status}` : "", ".");
        this.state.className = "file-state saved";
      }
      this.el.dataset.result = status === 200 || body.duplicate ? "duplicate" : "saved";
      this.remove.textContent = "Clear";
      return "saved";
    } catch (err) {
      this.progress.classList.add("hidden");
      if (err.offline) {
        await offline.keep(antennaId, this.file, this.fields());
        this.setState("Offline: kept on this device. Use “Send pending” when the network is back.", "duplicate");
        this.done = true;
        this.ctx.refreshPending();
        return "kept";
      }
      this.save.disabled = false;
      this.setState("Not saved.", "failed");
      fill(this.info, errorBox(err), this.preview ? metricsTable(this.preview) : null);
      return err.status === 401 ? "needs-token" : "failed";
    }
  }
}

/** Whether the server refused the file itself (4xx), so keeping it would not help. */
function refusesTheFile(err) {
  return err instanceof api.ApiError && err.status >= 400 && err.status < 500
    && ![401, 408, 429].includes(err.status);
}

function waitReason(err) {
  if (err instanceof api.ApiError && err.offline) return "the server cannot be reached; the files keep waiting.";
  if (err instanceof api.ApiError && err.status === 401) return `${api.NEEDS_TOKEN} The files keep waiting.`;
  if (err instanceof api.ApiError && err.status) {
    return `the server could not take them now (HTTP ${err.status}); the files keep waiting. Try again later.`;
  }
  return `${err && err.message ? err.message : String(err)}; the files keep waiting.`;
}

export async function render(root, _params, query) {
  const [sites, antennas] = await Promise.all([api.sites(), api.antennas()]);
  const defaults = {
    antenna: select({ name: "default-antenna" }, antennaOptions(sites, antennas), query.get("antenna") ?? ""),
    plane: select({ name: "default-plane" }, PLANES, "feedpoint"),
    conditions: h("input", { type: "text", name: "default-conditions", placeholder: "e.g. dry, 12 °C, after rain" }),
    operator: h("input", { type: "text", name: "operator", placeholder: "call sign", value: localStorage.getItem("mastwatch.operator") ?? "" }),
    notes: h("input", { type: "text", name: "notes" }),
  };
  defaults.operator.addEventListener("change", () => localStorage.setItem("mastwatch.operator", defaults.operator.value));
  const list = h("div", { class: "files", "aria-label": "Files to upload" });
  const pendingBox = h("div", { class: "notice hidden", "aria-live": "polite" });
  const ctx = {
    items: new Set(), defaults, antennaOptions: antennaOptions(sites, antennas), refreshPending,
    antennaById: new Map(antennas.map((a) => [a.id, a])), siteById: new Map(sites.map((s) => [s.id, s])),
  };

  function addFiles(files) {
    loadPlotly().catch(() => {});
    for (const file of files) {
      const item = new FileItem(file, ctx);
      ctx.items.add(item);
      list.append(item.el);
      item.analyze();
    }
  }

  async function refreshPending(stopped = null) {
    const waiting = await offline.pending();
    pendingBox.classList.toggle("hidden", !waiting.length);
    if (!waiting.length) return;
    fill(pendingBox, `${waiting.length} sweep file${waiting.length > 1 ? "s" : ""} waiting on this device. `,
      h("button", { type: "button", onclick: sendPending }, "Send pending"),
      stopped ? h("p", { class: "error", role: "alert" }, `Not sent: ${stopped}`) : null);
  }

  async function sendPending() {
    let stopped = null;
    for (const entry of await offline.pending()) {
      try {
        await api.upload(entry.antennaId, offline.asFile(entry), entry.fields);
        await offline.drop(entry.id);
      } catch (err) {
        if (!refusesTheFile(err)) {
          // Offline, no keeper token, a server or proxy that is down (5xx), or a failure
          // in this browser: not the file's fault. It and the rest keep waiting.
          stopped = waitReason(err);
          break;
        }
        await offline.drop(entry.id);
        list.prepend(h("div", { class: "file-card" }, h("span", { class: "fname" }, entry.name), errorBox(err)));
      }
    }
    refreshPending(stopped);
  }
  window.addEventListener("online", () => refreshPending());

  const input = h("input", { type: "file", multiple: true, id: "file-input", class: "hidden",
    accept: ".s1p,.s2p,.ts,.csv,.txt,text/csv,text/plain" });
  input.addEventListener("change", () => { addFiles([...input.files]); input.value = ""; });
  const drop = h("div", { class: "drop", id: "drop-zone", tabindex: 0, role: "button",
    "aria-label": "Drop sweep files here or choose them" },
  h("p", {}, h("b", {}, "Drop sweep files here"), " (Touchstone .s1p/.s2p, CSV)"),
  h("button", { type: "button", onclick: () => input.click() }, "Choose files…"));
  drop.addEventListener("keydown", (e) => { if (e.key === "Enter" || e.key === " ") { e.preventDefault(); input.click(); } });
  for (const type of ["dragenter", "dragover"]) {
    drop.addEventListener(type, (e) => { e.preventDefault(); drop.classList.add("over"); });
  }
  drop.addEventListener("dragleave", () => drop.classList.remove("over"));
  drop.addEventListener("drop", (e) => {
    e.preventDefault();
    drop.classList.remove("over");
    addFiles([...(e.dataTransfer?.files ?? [])]);
  });
  const saveAll = h("button", { type: "button", class: "primary", onclick: async () => {
    for (const item of ctx.items) {
      // No token given for one file: do not ask again for each of the others.
      if (!item.done && !item.save.disabled && (await item.upload()) === "needs-token") break;
    }
  } }, "Save all previewed");

  fill(root,
    h("h1", {}, "Upload sweeps"),
    pendingBox,
    h("form", { class: "panel", onsubmit: (e) => e.preventDefault() },
      h("p", { class: "muted small" }, "Defaults for the files you add (each file can be changed below)."),
      h("div", { class: "row" }, field("Antenna", defaults.antenna), field("Plane", defaults.plane),
        field("Conditions", defaults.conditions), field("Operator", defaults.operator), field("Notes", defaults.notes))),
    drop, input,
    list,
    h("div", { class: "row" }, saveAll),
  );
  refreshPending();
}
