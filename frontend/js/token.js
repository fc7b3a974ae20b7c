// The keeper-token dialog: asked for when the server refuses a change (401), see api.js.
// A native <dialog>: it traps focus, Escape cancels, and it needs no library.

import { tokenProblem } from "./api.js";
import { h } from "./dom.js";

/** Ask for the token; resolves the text typed, or null when cancelled. */
export function askKeeperToken({ wrong = false } = {}) {
  return new Promise((resolve) => {
    const input = h("input", { type: "password", name: "token", id: "keeper-token", autocomplete: "current-password",
      required: true, "aria-describedby": "keeper-token-problem" });
    const problem = h("p", { class: "error hidden", id: "keeper-token-problem", role: "alert" });
    const form = h("form", { method: "dialog" },
      h("h2", { id: "keeper-token-title" }, "Keeper token"),
      h("p", {}, wrong
        ? "The server did not accept the token this browser had. Type it again."
        : "Changing the club's records needs the keeper token. Ask the club's antenna keeper; this browser keeps it until you forget it on the Manage page."),
      h("label", { for: "keeper-token" }, "Token"), input, problem,
      h("div", { class: "actions" },
        h("button", { type: "submit", value: "ok", class: "primary" }, "Use token"),
        h("button", { type: "button", value: "cancel", onclick: () => dialog.close("cancel") }, "Cancel")));
    const dialog = h("dialog", { class: "token-dialog", "aria-labelledby": "keeper-token-title" }, form);
    // A token no header can carry is not sent (the server could only refuse it): say
    // what is wrong with it and keep the dialog open.
    form.addEventListener("submit", (e) => {
      const why = tokenProblem(input.value.trim());
      problem.textContent = why ?? "";
      problem.classList.toggle("hidden", !why);
      input.setAttribute("aria-invalid", why ? "true" : "false");
      if (why) { e.preventDefault(); input.select(); input.focus(); }
    });
    dialog.addEventListener("close", () => {
      const token = dialog.returnValue === "ok" ? input.value.trim() : "";
      dialog.remove();
      resolve(token || null);
    });
    document.body.append(dialog);
    dialog.showModal();
    input.focus();
  });
}
