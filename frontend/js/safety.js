// The usual cautions, shown wherever the app sends someone to go and look at an antenna
// (fault status, site check, distance-to-fault results). They defer to local codes.

import { h } from "./dom.js";

export const CAUTIONS = [
  "Never climb alone, and never climb or work on a mast in a storm, in high wind or on ice.",
  "Stay well clear of power lines: assume every overhead line is live.",
  "Keep RF exposure within your licence's limits when transmitting; switch off before touching an antenna or its feedline.",
  "Keep lightning protection and grounding in place; disconnect feedlines during thunderstorms.",
  "Follow local codes and licensed practice. Mastwatch points at what changed; a person decides what is safe.",
];

/** The cautions box; `list` replaces the default wording (e.g. the server's own). */
export function cautions(title = "Before you go and look", list = CAUTIONS) {
  return h("aside", { class: "caution", role: "note", "aria-label": "Safety cautions" },
    h("h3", {}, "⚠ ", title),
    h("ul", {}, (list && list.length ? list : CAUTIONS).map((text) => h("li", {}, text))),
  );
}
