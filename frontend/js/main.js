// The page shell: hash routing to the page modules, the nav highlight, the phone menu
// and the network indicator. Each page module exports render(root, params, query).
//
//   #/                       status board          pages/board.js
//   #/antenna/<id>[?sweep=]  antenna page          pages/antenna.js
//   #/upload[?antenna=]      upload sweeps         pages/upload.js
//   #/compare[?antenna=&a=&b=] compare two sweeps  pages/compare.js
//   #/check[/<site id>]      site check            pages/check.js
//   #/manage/<what>          manage records        pages/manage.js

import { onTokenNeeded } from "./api.js";
import { clear, errorBox, h } from "./dom.js";
import { askKeeperToken } from "./token.js";

const ROUTES = [
  [/^\/?$/, "board", () => import("./pages/board.js")],
  [/^\/antenna\/(\d+)$/, "board", () => import("./pages/antenna.js")],
  [/^\/upload$/, "upload", () => import("./pages/upload.js")],
  [/^\/compare$/, "compare", () => import("./pages/compare.js")],
  [/^\/check(?:\/(\d+))?$/, "check", () => import("./pages/check.js")],
  [/^\/manage(?:\/([a-z-]+))?$/, "manage", () => import("./pages/manage.js")],
];

let generation = 0;

function parseHash() {
  const raw = decodeURIComponent(window.location.hash.replace(/^#/, "")) || "/";
  const [path, search = ""] = raw.split("?");
  return { path, query: new URLSearchParams(search) };
}

async function route() {
  const mine = ++generation;
  const root = document.getElementById("main");
  const { path, query } = parseHash();
  const found = ROUTES.find(([re]) => re.test(path));
  for (const a of document.querySelectorAll("[data-nav]")) a.removeAttribute("aria-current");
  document.getElementById("nav").classList.remove("open");
  if (!found) {
    clear(root).append(h("h1", {}, "Page not found"), h("p", {}, h("a", { href: "#/" }, "Back to the status board")));
    return;
  }
  const [re, nav, load] = found;
  const navLink = document.querySelector(`[data-nav="${nav}"]`);
  if (navLink) navLink.setAttribute("aria-current", "page");
  const params = path.match(re).slice(1);
  try {
    const page = await load();
    if (mine !== generation) return;
    // The page is attached before it renders: plotly needs a laid-out element to draw in.
    const view = h("div", { class: "page", dataset: { page: nav } }, h("p", { class: "loading" }, "Loading…"));
    delete root.dataset.ready;
    clear(root).append(view);
    await page.render(view, params, query, () => mine !== generation);
    if (mine !== generation) return;
    const heading = view.querySelector("h1");
    document.title = heading ? `${heading.textContent} · Mastwatch` : "Mastwatch";
    root.dataset.ready = path;
  } catch (err) {
    if (mine !== generation) return;
    console.warn(err);
    clear(root).append(h("h1", {}, "This page could not be shown"), errorBox(err));
  }
}

function setupShell() {
  const toggle = document.querySelector(".menu-toggle");
  const nav = document.getElementById("nav");
  toggle.addEventListener("click", () => {
    const open = nav.classList.toggle("open");
    toggle.setAttribute("aria-expanded", String(open));
  });
  const net = document.getElementById("net");
  const showNet = () => {
    net.hidden = navigator.onLine;
    net.textContent = navigator.onLine ? "" : "Offline: uploads wait on this device";
  };
  window.addEventListener("online", showNet);
  window.addEventListener("offline", showNet);
  showNet();
}

window.addEventListener("hashchange", route);
onTokenNeeded(askKeeperToken);
setupShell();
route();
