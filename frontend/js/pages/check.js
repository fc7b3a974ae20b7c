// The site check, for the morning after a storm: every antenna of a site with its verdict,
// what has been swept since the event and what is still to sweep, with the safety
// cautions first. Uses GET /sites/{id}/check when the server has it; otherwise it is
// composed from the sweep lists (latest sweep, and the last sweep before the event).
// Route: #/check/<site id>?since=<ISO date or time>.

import * as api from "../api.js";
import { field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";
import { reasonsOf } from "../model.js";
import { cautions } from "../safety.js";
import { badge, normalVerdict } from "../verdict.js";

function defaultSince(events) {
  const storms = events.filter((e) => e.kind === "storm").sort((a, b) => String(b.occurred_at).localeCompare(String(a.occurred_at)));
  if (storms.length) return storms[0].occurred_at;
  return new Date(Date.now() - 30 * 86400e3).toISOString();
}

function sweepRef(s) {
  return s ? { id: s.id ?? s.sweep_id, measured_at: s.measured_at, status: s.status ?? null, reasons: reasonsOf(s) } : null;
}

/** F's check response as [{id, name, status, reasons, latest, before, swept}]. */
function fromServer(body, since) {
  const rows = body.antennas ?? body.items ?? [];
  return rows.map((e) => {
    const ant = e.antenna ?? e;
    const latest = sweepRef(e.latest ?? e.latest_sweep ?? null);
    const before = sweepRef(e.before ?? e.before_event ?? e.previous ?? null);
    const verdict = e.verdict ?? e.vs_baseline ?? e.health ?? {};
    const swept = e.swept_since ?? (latest ? latest.measured_at >= since : false);
    return {
      id: ant.antenna_id ?? ant.id, name: ant.name ?? ant.antenna_name ?? `antenna ${ant.id}`,
      status: e.status ?? verdict.status ?? latest?.status ?? "unknown",
      reasons: reasonsOf(e).length ? reasonsOf(e) : reasonsOf(verdict).length ? reasonsOf(verdict) : latest?.reasons ?? [],
      latest, before, swept: Boolean(swept), flagged: Boolean(e.flagged),
      vsBefore: e.vs_before ? { status: e.vs_before.status, reasons: reasonsOf(e.vs_before) } : null,
    };
  });
}

async function composed(siteId, since) {
  const antennas = await api.antennas(siteId);
  return Promise.all(antennas.map(async (a) => {
    const [latest] = await api.sweeps(a.id, { limit: 1 });
    const [before] = await api.sweeps(a.id, { limit: 1, until: since });
    const swept = Boolean(latest && new Date(latest.measured_at) >= new Date(since));
    return {
      id: a.id, name: a.name, status: swept ? latest.status ?? "unknown" : "unknown",
      reasons: swept ? reasonsOf(latest) : ["not swept since the event"],
      latest: sweepRef(latest), before: sweepRef(before), swept,
    };
  }));
}

function reasonList(reasons) {
  return h("ul", { class: "reasons" }, reasons.map((t) => h("li", {}, t)));
}

function row(r) {
  const compare = r.before && r.latest && r.before.id !== r.latest.id
    ? h("a", { href: `#/compare?antenna=${r.id}&a=${r.before.id}&b=${r.latest.id}` }, "before vs after") : null;
  return h("tr", { dataset: { antennaId: r.id, swept: String(r.swept), flagged: String(Boolean(r.flagged)) },
    class: r.flagged ? "flagged" : null },
    h("td", {}, h("a", { href: `#/antenna/${r.id}` }, r.name)),
    h("td", {}, badge(normalVerdict(r.status))),
    h("td", {}, r.latest ? `${fmt.date(r.latest.measured_at)} (${fmt.age(r.latest.measured_at)})` : "never"),
    h("td", {}, r.before ? fmt.date(r.before.measured_at) : "—"),
    h("td", {}, r.vsBefore ? [badge(normalVerdict(r.vsBefore.status)), reasonList(r.vsBefore.reasons)] : "—"),
    h("td", {}, r.reasons.length ? reasonList(r.reasons) : "—", compare));
}

export async function render(root, [siteIdText], query) {
  const sites = await api.sites();
  if (!sites.length) {
    fill(root, h("h1", {}, "Site check"), h("p", { class: "panel" }, "No sites yet."));
    return;
  }
  const siteId = Number(siteIdText) || sites[0].id;
  const site = sites.find((s) => s.id === siteId) ?? sites[0];
  const events = await api.siteEvents(site.id).catch(() => []);
  const since = query.get("since") || defaultSince(events);
  const siteSel = select({ name: "site", "aria-label": "Site" }, sites.map((s) => [s.id, s.name]), site.id);
  const sinceIn = h("input", { type: "date", name: "since", value: fmt.date(since) });
  const eventSel = select({ name: "event", "aria-label": "Since the event" },
    [["", "Pick an event…"], ...events.slice().reverse().map((e) => [e.occurred_at, `${fmt.date(e.occurred_at)} ${e.kind}: ${e.title}`])],
    events.some((e) => e.occurred_at === since) ? since : "");
  const go = (value) => { window.location.hash = `#/check/${siteSel.value}?since=${encodeURIComponent(value)}`; };
  siteSel.addEventListener("change", () => { window.location.hash = `#/check/${siteSel.value}`; });
  sinceIn.addEventListener("change", () => sinceIn.value && go(new Date(`${sinceIn.value}T00:00:00Z`).toISOString()));
  eventSel.addEventListener("change", () => eventSel.value && go(eventSel.value));

  const server = (await api.has("check")) ? await api.siteCheck(site.id, since) : null;
  const rows = server ? fromServer(server, since) : await composed(site.id, since);
  // Flagged antennas first: they are why someone opened this page.
  const done = rows.filter((r) => r.swept).sort((a, b) => Number(b.flagged) - Number(a.flagged));
  const todo = rows.filter((r) => !r.swept);
  const header = h("tr", {}, ["Antenna", "Verdict", "Latest sweep", "Last before", "Against the sweep before", "Against the baseline"].map((t) => h("th", {}, t)));
  const event = events.find((e) => e.occurred_at === since);

  fill(root,
    h("h1", {}, `Site check: ${site.name}`),
    cautions("Before anyone goes up to look", server?.cautions),
    h("form", { class: "panel row", onsubmit: (e) => e.preventDefault() },
      field("Site", siteSel), field("Since", sinceIn), field("Event", eventSel)),
    h("p", {}, `Since ${fmt.dateTime(since)}${event ? ` (${event.kind}: ${event.title})` : ""}: `,
      `${done.length} of ${rows.length} antennas swept, ${todo.length} still to sweep.`),
    h("section", { class: "panel", id: "still-to-sweep" },
      h("h2", {}, "Still to sweep"),
      todo.length ? h("ul", {}, todo.map((r) => h("li", { dataset: { antennaId: r.id } },
        h("a", { href: `#/antenna/${r.id}` }, r.name), r.latest ? ` — last swept ${fmt.date(r.latest.measured_at)}` : " — never swept",
        " · ", h("a", { href: `#/upload?antenna=${r.id}` }, "upload a sweep"))))
        : h("p", { class: "muted" }, "Every antenna of this site has been swept since then.")),
    h("section", { class: "panel", id: "swept-since" },
      h("h2", {}, "Swept since"),
      done.length ? h("div", { class: "table-wrap" }, h("table", {}, h("thead", {}, header), h("tbody", {}, done.map(row))))
        : h("p", { class: "muted" }, "Nothing swept since then yet.")),
  );
}
