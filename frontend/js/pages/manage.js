// Manage the records: sites, antennas, feedlines, cable types and events, as plain forms
// over the CRUD API. Route: #/manage/<sites|antennas|feedlines|cable-types|events>
// [?edit=<id>]. Deleting asks twice on the button itself (no browser dialog).

import * as api from "../api.js";
import { errorBox, field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";

const TABS = [["sites", "Sites"], ["antennas", "Antennas"], ["feedlines", "Feedlines"], ["cable-types", "Cable types"], ["events", "Events"]];
const KINDS = ["dipole", "vertical", "yagi", "loop", "end-fed", "j-pole", "collinear", "other"];
const EVENT_KINDS = ["storm", "maintenance", "repair", "modification", "note"];

/** A form from field specs [{name, label, type, options, value, required, step}]; values() reads it. */
function form(specs, onSubmit, submitText) {
  const controls = new Map();
  const message = h("div", { "aria-live": "polite" });
  const el = h("form", { class: "panel manage-form" });
  const row = h("div", { class: "row" });
  for (const s of specs) {
    let c;
    if (s.type === "select") c = select({ name: s.name, required: s.required }, s.options, s.value);
    else if (s.type === "textarea") c = h("textarea", { name: s.name, value: s.value ?? "" });
    else c = h("input", { name: s.name, type: s.type ?? "text", value: s.value ?? "", required: s.required, step: s.step, min: s.min, max: s.max, placeholder: s.placeholder });
    controls.set(s.name, c);
    row.append(field(s.label, c));
  }
  const button = h("button", { type: "submit", class: "primary" }, submitText);
  el.append(row, h("div", { class: "row" }, button), message);
  el.addEventListener("submit", async (e) => {
    e.preventDefault();
    button.disabled = true;
    try {
      const values = Object.fromEntries([...controls].map(([k, c]) => [k, c.value]));
      await onSubmit(values);
    } catch (err) {
      fill(message, errorBox(err));
    } finally {
      button.disabled = false;
    }
  });
  return el;
}

function deleteButton(what, call) {
  let armed = false;
  const b = h("button", { type: "button", class: "danger small" }, "Delete");
  b.addEventListener("click", async () => {
    if (!armed) { armed = true; b.textContent = `Really delete ${what}?`; return; }
    try { await call(); reload(); } catch (err) { b.replaceWith(errorBox(err)); }
  });
  return b;
}

function reload() {
  window.dispatchEvent(new HashChangeEvent("hashchange"));
}

const text = (v) => (v === undefined || v === null || v === "" ? null : v);
const numberOrNull = (v) => (v === "" || v === undefined ? null : Number(v));

function table(head, rows) {
  return h("div", { class: "table-wrap" }, h("table", {},
    h("thead", {}, h("tr", {}, head.map((t) => h("th", {}, t)))),
    h("tbody", {}, rows)));
}

async function sitesTab(edit) {
  const sites = await api.sites();
  const cur = sites.find((s) => s.id === edit);
  const f = form([
    { name: "name", label: "Name", required: true, value: cur?.name },
    { name: "itu_region", label: "ITU region", type: "select", options: [["1", "Region 1"], ["2", "Region 2"], ["3", "Region 3"]], value: cur?.itu_region ?? 1 },
    { name: "locator", label: "Maidenhead locator", value: cur?.locator ?? "", placeholder: "e.g. JO62qm" },
    { name: "timezone", label: "Time zone", value: cur?.timezone ?? "", placeholder: "e.g. Europe/Berlin" },
    { name: "notes", label: "Notes", type: "textarea", value: cur?.notes },
  ], async (v) => {
    const body = { name: v.name, itu_region: Number(v.itu_region), locator: text(v.locator), timezone: text(v.timezone), notes: v.notes };
    if (cur) await api.updateSite(cur.id, body); else await api.createSite(body);
    window.location.hash = "#/manage/sites";
    reload();
  }, cur ? "Save site" : "Add site");
  return [
    h("h2", {}, cur ? `Edit site: ${cur.name}` : "Add a site"), f,
    h("h2", {}, "Sites"),
    table(["Name", "Region", "Locator", "Time zone", ""], sites.map((s) => h("tr", { dataset: { siteId: s.id } },
      h("td", {}, s.name), h("td", {}, String(s.itu_region)), h("td", {}, s.locator ?? "—"), h("td", {}, s.timezone),
      h("td", {}, h("a", { href: `#/manage/sites?edit=${s.id}` }, "Edit"), " ", deleteButton("this site", () => api.deleteSite(s.id)))))),
  ];
}

async function antennasTab(edit) {
  const [sites, antennas] = await Promise.all([api.sites(), api.antennas()]);
  const cur = antennas.find((a) => a.id === edit);
  const siteName = new Map(sites.map((s) => [s.id, s.name]));
  const f = form([
    { name: "site_id", label: "Site", type: "select", options: sites.map((s) => [s.id, s.name]), value: cur?.site_id, required: true },
    { name: "name", label: "Name", required: true, value: cur?.name },
    { name: "kind", label: "Kind", type: "select", options: KINDS.map((k) => [k, k]), value: cur?.kind ?? "dipole" },
    { name: "bands", label: "Bands (comma separated)", value: (cur?.bands ?? []).join(", "), placeholder: "e.g. 40m, 20m" },
    { name: "installed_on", label: "Installed on", type: "date", value: cur?.installed_on ?? "" },
    { name: "notes", label: "Notes", type: "textarea", value: cur?.notes },
  ], async (v) => {
    const body = { site_id: Number(v.site_id), name: v.name, kind: v.kind, bands: v.bands.split(/[,\s]+/).filter(Boolean),
      installed_on: text(v.installed_on), notes: v.notes };
    const saved = cur ? await api.updateAntenna(cur.id, body) : await api.createAntenna(body);
    window.location.hash = `#/antenna/${saved.id}`;
  }, cur ? "Save antenna" : "Add antenna");
  return [
    h("h2", {}, cur ? `Edit antenna: ${cur.name}` : "Add an antenna"),
    sites.length ? f : h("p", { class: "panel" }, "Add a site first."),
    h("h2", {}, "Antennas"),
    table(["Site", "Name", "Kind", "Bands", "Installed", ""], antennas.map((a) => h("tr", { dataset: { antennaId: a.id } },
      h("td", {}, siteName.get(a.site_id) ?? ""), h("td", {}, h("a", { href: `#/antenna/${a.id}` }, a.name)), h("td", {}, a.kind),
      h("td", {}, (a.bands ?? []).join(", ")), h("td", {}, a.installed_on ?? "—"),
      h("td", {}, h("a", { href: `#/manage/antennas?edit=${a.id}` }, "Edit"), " ", deleteButton("this antenna and its sweeps", () => api.deleteAntenna(a.id)))))),
  ];
}

async function feedlinesTab(edit) {
  const [antennas, cables] = await Promise.all([api.antennas(), api.cableTypes()]);
  const cur = antennas.find((a) => a.id === edit) ?? antennas[0];
  const fl = cur?.feedline;
  const f = form([
    { name: "antenna", label: "Antenna", type: "select", options: antennas.map((a) => [a.id, a.name]), value: cur?.id },
    { name: "cable_type_id", label: "Cable type", type: "select", options: cables.map((c) => [c.id, `${c.name} (VF ${c.velocity_factor})`]), value: fl?.cable_type?.id },
    { name: "length_m", label: "Length (m)", type: "number", step: "0.01", min: "0.01", value: fl?.length_m ?? "", required: true },
    { name: "connectors", label: "Connectors", type: "number", step: "1", min: "0", value: fl?.connectors ?? 2 },
    { name: "notes", label: "Notes", type: "textarea", value: fl?.notes },
  ], async (v) => {
    await api.putFeedline(Number(v.antenna), { cable_type_id: Number(v.cable_type_id), length_m: Number(v.length_m),
      connectors: Number(v.connectors || 0), notes: v.notes });
    window.location.hash = `#/manage/feedlines?edit=${v.antenna}`;
    reload();
  }, "Save feedline");
  const antSel = f.querySelector("select[name=antenna]");
  if (antSel) antSel.addEventListener("change", () => { window.location.hash = `#/manage/feedlines?edit=${antSel.value}`; });
  return [
    h("h2", {}, "Feedline of an antenna"),
    h("p", { class: "muted small" }, "Sweeps taken at the radio end of this line are de-embedded to the feedpoint with it."),
    antennas.length ? f : h("p", { class: "panel" }, "Add an antenna first."),
    h("h2", {}, "Feedlines on record"),
    table(["Antenna", "Cable", "Length", "Connectors"], antennas.filter((a) => a.feedline).map((a) => h("tr", {},
      h("td", {}, h("a", { href: `#/manage/feedlines?edit=${a.id}` }, a.name)), h("td", {}, a.feedline.cable_type?.name ?? ""),
      h("td", {}, fmt.num(a.feedline.length_m, 2, "m")), h("td", {}, String(a.feedline.connectors))))),
  ];
}

async function cablesTab() {
  const cables = await api.cableTypes();
  const f = form([
    { name: "name", label: "Name", required: true },
    { name: "z0_ohm", label: "Z0 (Ω)", type: "number", step: "any", value: 50, required: true },
    { name: "velocity_factor", label: "Velocity factor", type: "number", step: "any", min: "0.01", max: "1", required: true },
    { name: "k1", label: "k1 (dB/100 m per √MHz)", type: "number", step: "any", min: "0" },
    { name: "k2", label: "k2 (dB/100 m per MHz)", type: "number", step: "any", min: "0" },
    { name: "k0", label: "k0 (dB/100 m)", type: "number", step: "any", min: "0" },
    { name: "source", label: "Source of the figures", placeholder: "e.g. maker's table, own measurement" },
  ], async (v) => {
    await api.createCableType({ name: v.name, z0_ohm: Number(v.z0_ohm), velocity_factor: Number(v.velocity_factor),
      k0: numberOrNull(v.k0), k1: numberOrNull(v.k1), k2: numberOrNull(v.k2), source: v.source });
    reload();
  }, "Add cable type");
  return [
    h("h2", {}, "Add a cable type"),
    h("p", { class: "muted small" }, "Matched loss in dB per 100 m = k0 + k1·√f + k2·f, with f in MHz."), f,
    h("h2", {}, "Cable types"),
    table(["Name", "Z0", "VF", "k0", "k1", "k2", "Loss at 10 MHz", "Source"], cables.map((c) => h("tr", {},
      h("td", {}, c.name, c.builtin ? h("span", { class: "chip" }, "catalog") : null), h("td", {}, fmt.num(c.z0_ohm, 0, "Ω")),
      h("td", {}, fmt.num(c.velocity_factor, 3)), h("td", {}, fmt.num(c.k0, 3)), h("td", {}, fmt.num(c.k1, 3)), h("td", {}, fmt.num(c.k2, 4)),
      h("td", {}, fmt.num(c.k0 + c.k1 * Math.sqrt(10) + c.k2 * 10, 2, "dB/100 m")), h("td", { class: "small" }, c.source ?? "")))),
  ];
}

async function eventsTab() {
  const [sites, antennas] = await Promise.all([api.sites(), api.antennas()]);
  const owners = [...sites.map((s) => [`site:${s.id}`, `Site: ${s.name}`]), ...antennas.map((a) => [`antenna:${a.id}`, `Antenna: ${a.name}`])];
  const f = form([
    { name: "owner", label: "For", type: "select", options: owners },
    { name: "kind", label: "Kind", type: "select", options: EVENT_KINDS.map((k) => [k, k]), value: "note" },
    { name: "occurred_at", label: "When", type: "datetime-local", value: fmt.localInput(), required: true },
    { name: "title", label: "Title", required: true },
    { name: "notes", label: "Notes", type: "textarea" },
  ], async (v) => {
    const [kind, id] = v.owner.split(":");
    const body = { kind: v.kind, occurred_at: new Date(v.occurred_at).toISOString(), title: v.title, notes: v.notes };
    if (kind === "site") await api.createSiteEvent(Number(id), body); else await api.createAntennaEvent(Number(id), body);
    reload();
  }, "Add event");
  const siteName = new Map(sites.map((s) => [s.id, s.name]));
  const antName = new Map(antennas.map((a) => [a.id, a.name]));
  const lists = await Promise.all([...sites.map((s) => api.siteEvents(s.id)), ...antennas.map((a) => api.antennaEvents(a.id))]);
  const byId = new Map(lists.flat().map((e) => [e.id, e]));
  const antSite = new Map(antennas.map((a) => [a.id, a.site_id]));
  const all = [...byId.values()]
    .map((e) => ({ ...e, where: siteName.get(e.site_id ?? antSite.get(e.antenna_id)) ?? "" }))
    .sort((a, b) => String(b.occurred_at).localeCompare(String(a.occurred_at)));
  return [
    h("h2", {}, "Add an event"),
    h("p", { class: "muted small" }, "Storms, repairs and modifications show as markers on the trend plots; a repair or modification starts a new baseline."),
    owners.length ? f : h("p", { class: "panel" }, "Add a site first."),
    h("h2", {}, "Events"),
    table(["When", "Kind", "Where", "Title", "Notes"], all.map((e) => h("tr", {},
      h("td", { class: "nowrap" }, fmt.date(e.occurred_at)), h("td", {}, e.kind), h("td", {}, e.antenna_id ? `${e.where} / ${antName.get(e.antenna_id) ?? ""}` : e.where),
      h("td", {}, e.title), h("td", { class: "small" }, e.notes ?? "")))),
  ];
}

const RENDER = { sites: sitesTab, antennas: antennasTab, feedlines: feedlinesTab, "cable-types": cablesTab, events: eventsTab };

export async function render(root, [tabName], query) {
  const tab = RENDER[tabName] ? tabName : "sites";
  const edit = Number(query.get("edit")) || null;
  const nav = h("nav", { class: "tabs", "aria-label": "What to manage" },
    TABS.map(([key, label]) => h("a", { href: `#/manage/${key}`, class: "chip", "aria-current": key === tab ? "page" : null }, label)));
  fill(root, h("h1", {}, "Manage records"), await whoMayChange(), nav, ...(await RENDER[tab](edit)));
}

/** Whether changes need the keeper token, and whether this browser keeps one. */
async function whoMayChange() {
  const status = await api.serverStatus().catch(() => null);
  const box = h("div", { class: "panel small", id: "who-may-change" });
  if (!status) return box;
  if (!status.changes_need_token) {
    fill(box, h("b", {}, "Open server: "), "anyone who reaches this server can change these records. ",
      "Set MASTWATCH_KEEPER_TOKEN on the server before it is reachable beyond a trusted network.");
    return box;
  }
  const show = () => {
    if (api.keeperToken()) {
      fill(box, "Changes need the keeper token; this browser keeps it. ",
        h("button", { type: "button", onclick: () => { api.setKeeperToken(null); show(); } }, "Forget the token"));
    } else {
      fill(box, "Changes need the keeper token; it is asked for at the first change and kept in this browser.");
    }
  };
  show();
  return box;
}
