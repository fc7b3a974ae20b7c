// The status board (home): one section per site, one card per antenna with its verdict,
// bands, last sweep and its age, SWR at band centres and a min-SWR sparkline. Filters by
// site, band and verdict; sweeps older than the stale age stand out.

import { clear, field, fill, h, select } from "../dom.js";
import * as fmt from "../format.js";
import { loadBoard } from "../model.js";
import { cautions } from "../safety.js";
import { sparkline } from "../sparkline.js";
import { VERDICT_WORDS, VERDICTS, badge, normalVerdict } from "../verdict.js";

const STALE_KEY = "mastwatch.staleAfterDays";
const DEFAULT_STALE_DAYS = 180;

function card(c, staleDays) {
  const status = normalVerdict(c.status);
  const days = c.lastSweep ? fmt.ageDays(c.lastSweep.measured_at) : null;
  const stale = days === null || days > staleDays;
  const when = c.lastSweep
    ? `Last sweep ${fmt.date(c.lastSweep.measured_at)} (${fmt.age(c.lastSweep.measured_at)})`
    : "Never swept";
  return h("a", {
    class: ["card", status, stale && "stale"], href: `#/antenna/${c.id}`,
    dataset: { antennaId: c.id, verdict: status, stale: String(stale) },
  },
  h("div", { class: "title" },
    h("div", {}, h("div", { class: "name" }, c.name), h("div", { class: "kind" }, c.kind)),
    badge(status)),
  h("div", { class: "chips" }, c.bands.map((b) => h("span", { class: "chip" }, b))),
  h("div", { class: "when" }, when, " ", stale ? h("span", { class: "stale-tag" }, "stale") : null),
  c.swrCenter.length
    ? h("div", { class: "swr-list", "aria-label": "SWR at band centres" },
      h("span", { class: "muted" }, "SWR at centre:"),
      c.swrCenter.map((s) => h("span", {}, `${s.band} `,
        h("b", {}, fmt.swrAtCentre({ swr_center: s.value, centre_swept: s.swept })))))
    : null,
  c.reasons.length ? h("ul", { class: "reasons" }, c.reasons.slice(0, 3).map((r) => h("li", {}, r))) : null,
  sparkline(c.spark, `Min SWR over time, ${c.name}`));
}

export async function render(root, _params, query) {
  const board = await loadBoard();
  const staleDays = Number(localStorage.getItem(STALE_KEY)) || board.staleAfterDays || DEFAULT_STALE_DAYS;
  const state = {
    site: query.get("site") ?? "",
    band: query.get("band") ?? "",
    verdict: query.get("verdict") ?? "",
    staleDays,
  };
  const allBands = [...new Set(board.sites.flatMap((s) => s.cards.flatMap((c) => c.bands)))];
  const body = h("div", {});
  const summary = h("div", { class: "summary", "aria-live": "polite" });

  const siteSel = select({ name: "site" }, [["", "All sites"], ...board.sites.map((s) => [s.site.id, s.site.name])], state.site);
  const bandSel = select({ name: "band" }, [["", "All bands"], ...allBands.map((b) => [b, b])], state.band);
  const verdictSel = select({ name: "verdict" }, [["", "Any verdict"], ...VERDICTS.map((v) => [v, VERDICT_WORDS[v]])], state.verdict);
  const staleIn = h("input", { type: "number", min: 1, max: 3650, value: staleDays, name: "stale", inputmode: "numeric" });

  function draw() {
    clear(body);
    clear(summary);
    const counts = { ok: 0, watch: 0, fault: 0, unknown: 0 };
    let shown = 0;
    for (const s of board.sites) {
      if (state.site && String(s.site.id) !== state.site) continue;
      const cards = s.cards.filter((c) => (!state.band || c.bands.includes(state.band))
        && (!state.verdict || normalVerdict(c.status) === state.verdict));
      if (!cards.length && (state.band || state.verdict)) continue;
      for (const c of cards) counts[normalVerdict(c.status)] += 1;
      shown += cards.length;
      body.append(h("section", { class: "site", dataset: { siteId: s.site.id } },
        h("header", {},
          h("h2", {}, s.site.name),
          h("span", { class: "muted small" }, [s.site.locator, s.site.itu_region ? `ITU region ${s.site.itu_region}` : null].filter(Boolean).join(" · ")),
          h("a", { href: `#/check/${s.site.id}`, class: "small" }, "Site check")),
        cards.length
          ? h("div", { class: "cards" }, cards.map((c) => card(c, state.staleDays)))
          : h("p", { class: "muted" }, "No antennas recorded at this site yet.")));
    }
    for (const v of VERDICTS) if (counts[v]) summary.append(h("span", {}, badge(v), ` ${counts[v]}`));
    if (!shown) {
      body.append(h("p", { class: "panel" }, board.sites.length
        ? "No antenna matches these filters."
        : h("span", {}, "No sites yet. ", h("a", { href: "#/manage/sites" }, "Add the club's first site"), ".")));
    }
    if (counts.fault) body.prepend(cautions("An antenna shows a fault: before anyone goes to look"));
  }

  const onChange = () => {
    state.site = siteSel.value;
    state.band = bandSel.value;
    state.verdict = verdictSel.value;
    const days = Number(staleIn.value);
    if (days > 0) {
      state.staleDays = days;
      localStorage.setItem(STALE_KEY, String(days));
    }
    const q = new URLSearchParams(Object.entries({ site: state.site, band: state.band, verdict: state.verdict }).filter(([, v]) => v));
    history.replaceState(null, "", `#/${q.size ? `?${q}` : ""}`);
    draw();
  };
  for (const el of [siteSel, bandSel, verdictSel, staleIn]) el.addEventListener("change", onChange);

  fill(root,
    h("h1", {}, "Status board"),
    h("form", { class: "filters panel", onsubmit: (e) => e.preventDefault() },
      field("Site", siteSel), field("Band", bandSel), field("Verdict", verdictSel),
      field("Stale after (days)", staleIn)),
    summary,
    body,
  );
  draw();
}
