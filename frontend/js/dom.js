// Building DOM safely: every piece of text goes in through textContent, never innerHTML.
//   h("a", {href: "#/x", class: "card"}, "text", child)   -> an element
//   svg("path", {d: "M0 0"})                              -> an SVG element
// Attributes named on* take functions (event listeners); `dataset` takes an object.

const SVG_NS = "http://www.w3.org/2000/svg";

function apply(el, attrs) {
  for (const [key, value] of Object.entries(attrs || {})) {
    if (value === undefined || value === null || value === false) continue;
    if (key.startsWith("on") && typeof value === "function") {
      el.addEventListener(key.slice(2).toLowerCase(), value);
    } else if (key === "dataset") {
      Object.assign(el.dataset, value);
    } else if (key === "class") {
      el.setAttribute("class", Array.isArray(value) ? value.filter(Boolean).join(" ") : value);
    } else if (key === "value" && "value" in el) {
      el.value = value;
    } else if (key === "checked" || key === "selected" || key === "disabled" || key === "multiple") {
      el[key] = Boolean(value);
    } else {
      el.setAttribute(key, value === true ? "" : String(value));
    }
  }
}

function append(el, children) {
  for (const child of children.flat(Infinity)) {
    if (child === undefined || child === null || child === false) continue;
    el.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
}

export function h(tag, attrs, ...children) {
  const el = document.createElement(tag);
  apply(el, attrs);
  append(el, children);
  return el;
}

export function svg(tag, attrs, ...children) {
  const el = document.createElementNS(SVG_NS, tag);
  for (const [key, value] of Object.entries(attrs || {})) {
    if (value !== undefined && value !== null) el.setAttribute(key, String(value));
  }
  append(el, children);
  return el;
}

export function clear(el) {
  while (el.firstChild) el.firstChild.remove();
  return el;
}

/** Replace an element's children. */
export function fill(el, ...children) {
  clear(el);
  append(el, children);
  return el;
}

/** Escape text for the few places a string must go into markup (plotly hover templates). */
export function escapeHtml(text) {
  return String(text ?? "").replace(/[&<>"']/g, (c) => ({
    "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;",
  })[c]);
}

/** A labelled form control: label text above the control. */
export function field(text, control) {
  return h("label", {}, text, control);
}

/** A <select> from [value, text] pairs. */
export function select(attrs, options, current) {
  const el = h("select", attrs);
  for (const [value, text] of options) {
    el.append(h("option", { value: String(value), selected: String(value) === String(current ?? "") }, text));
  }
  return el;
}

/** Show an error (an ApiError or any Error) as a block of text. */
export function errorBox(err) {
  const line = err && err.line != null ? ` (line ${err.line})` : "";
  return h("p", { class: "error", role: "alert" }, `${err && err.message ? err.message : String(err)}${line}`);
}
