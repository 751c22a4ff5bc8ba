// Checks: the generated checklists, ticked with initials; the "ready to raise" state; the history.

import { clear, h } from "./dom.js";
import { field } from "./fields.js";
import { EntryError } from "./units.js";
import { count } from "./words.js";

const INITIALS_KEY = "fieldkit.initials";
const STAGE_NAMES = { "pre-raise": "Before raising", raise: "While raising", "after-raise": "After raising", "tear-down": "Taking down" };

function initials() {
  try {
    return localStorage.getItem(INITIALS_KEY) || "";
  } catch {
    return "";
  }
}

/** Ready to raise, from the items as this device sees them (pending ticks included). */
export function readiness(app) {
  const st = app.state;
  const option = st.plan?.options?.[0];
  const open = st.checks.filter((c) => c.stage === "pre-raise" && c.required && !c.done);
  const raiseOk = option?.safety?.raise_ok;
  const pendingHere = st.pending.filter((p) => p.deployment_id === st.id);
  return { option, open, raiseOk, ready: Boolean(option) && raiseOk !== false && open.length === 0 && st.checks.length > 0, pending: pendingHere };
}

function readyBox(app) {
  const r = readiness(app);
  const box = h("div", { class: `ready-box ${r.ready ? "is-ready" : "not-ready"}`, "data-testid": "ready-state", "data-ready": String(r.ready) });
  if (!r.option) box.append(h("p", { class: "big", text: "No plan yet" }));
  else if (r.raiseOk === false) {
    box.append(h("p", { class: "big", text: "Do not raise" }));
    for (const c of r.option.safety?.clearances ?? []) if (!c.ok) box.append(h("p", { text: `${c.hazard_name ?? "power line"}: ${c.why}` }));
  } else if (r.ready) {
    box.append(h("p", { class: "big", text: "Ready to raise" }));
    box.append(h("p", { text: r.pending.length ? `All required checks are ticked; ${count(r.pending.length, "tick")} still waiting to reach the service.` : "All required pre-raise checks are ticked." }));
  } else {
    box.append(h("p", { class: "big", text: "Not ready to raise" }));
    box.append(h("p", { text: `${count(r.open.length, "required pre-raise check")} still open.` }));
  }
  return box;
}

export function render(app, panel) {
  const st = app.state;
  clear(panel);
  panel.append(h("h2", { text: "Checks" }));
  panel.append(h("div", { "data-ready-holder": "1" }, [readyBox(app)]));
  if (st.checksError) panel.append(h("p", { class: "note warn", text: st.checksError }));
  const who = field({
    label: "Your initials (stored on this device)", value: initials(), testid: "initials", fieldPath: "by",
    parse: (t) => {
      const v = t.trim();
      if (!v) throw new EntryError("type your initials before ticking, e.g. AB");
      if (v.length > 10) throw new EntryError("at most 10 characters");
      return v;
    },
    onValid: (v) => localStorage.setItem(INITIALS_KEY, v),
  });
  panel.append(who);
  if (!st.checks.length) {
    panel.append(h("p", { class: "note", text: st.plan ? "The plan generated no checklist." : "The checklist comes with the plan: add the supports in Site first." }));
  }
  const stages = [...new Set(st.checks.map((c) => c.stage))];
  for (const stage of stages) {
    const list = h("ul", { class: "checklist", "data-stage": stage });
    for (const item of st.checks.filter((c) => c.stage === stage)) list.append(checkItem(app, item, who));
    panel.append(h("h3", { text: STAGE_NAMES[stage] ?? stage }), list);
  }
  panel.append(historyBox(app));
}

export function refresh(app, panel) {
  const y = window.scrollY;
  render(app, panel);
  window.scrollTo(0, y);
}

function checkItem(app, item, who) {
  const st = app.state;
  const pending = st.pending.filter((p) => p.deployment_id === st.id && p.item_id === item.id);
  const li = h("li", { class: `check ${item.done ? "done" : ""} ${pending.length ? "is-pending" : ""}`, "data-testid": `check-${item.id}`, "data-done": String(item.done) });
  const btn = h("button", { type: "button", class: "tick", role: "checkbox", "aria-checked": String(item.done), "data-testid": `tick-${item.id}` }, [
    h("span", { class: "box", "aria-hidden": "true", text: item.done ? "✓" : "" }),
    h("span", { class: "text", text: item.text }),
  ]);
  btn.addEventListener("click", async () => {
    const r = who.check();
    if (!r.ok) {
      who.input.focus();
      who.scrollIntoView({ block: "center" });
      return;
    }
    btn.disabled = true;
    await app.tick(item, !item.done, r.value);
  });
  li.append(btn);
  const meta = h("p", { class: "meta" });
  if (item.required) meta.append(h("span", { class: "tag", text: "required" }));
  if (item.done && item.by) meta.append(h("span", { text: `ticked by ${item.by}${item.at ? ` at ${new Date(item.at).toLocaleTimeString([], { hour: "2-digit", minute: "2-digit" })}` : ""}` }));
  if (pending.length) meta.append(h("span", { class: "pending", "data-testid": `pending-${item.id}`, text: "pending — kept on this device until the service answers" }));
  li.append(meta);
  return li;
}

function historyBox(app) {
  const st = app.state;
  const box = h("details", { class: "card", "data-testid": "history" });
  box.append(h("summary", { text: "History" }));
  const body = h("div");
  box.append(body);
  box.addEventListener("toggle", async () => {
    if (!box.open) return;
    clear(body).append(h("p", { class: "note", text: "Loading…" }));
    const rows = [];
    for (const p of st.pending.filter((e) => e.deployment_id === st.id)) rows.push({ ...p.body, item_id: p.item_id, state: "pending" });
    for (const item of st.checks.filter((c) => c.acknowledgements > 0)) {
      try {
        const data = await app.call(() => app.api.request("GET", `/api/deployments/${encodeURIComponent(st.id)}/checks/${encodeURIComponent(item.id)}`));
        for (const a of data.history ?? []) rows.push({ ...a, state: "recorded" });
      } catch (e) {
        rows.push({ item_id: item.id, by: "", at: "", done: null, state: `not available: ${e.message}` });
        break;
      }
    }
    // newest first in the service's receipt order (pending ticks, not received yet, on top)
    rows.sort((a, b) => String(b.received_at ?? "~").localeCompare(String(a.received_at ?? "~")));
    clear(body);
    if (!rows.length) {
      body.append(h("p", { text: "Nothing ticked yet." }));
      return;
    }
    const t = h("table", { class: "plain compact" });
    t.append(h("thead", {}, [h("tr", {}, [h("th", { text: "when" }), h("th", { text: "item" }), h("th", { text: "by" }), h("th", { text: "" })])]));
    const tb = h("tbody");
    for (const r of rows) {
      const text = st.checks.find((c) => c.id === r.item_id)?.text ?? r.item_id;
      const when = `${r.at ? new Date(r.at).toLocaleString() : ""}${r.received_at ? ` (received ${new Date(r.received_at).toLocaleString()})` : ""}${r.clock_ahead ? " — the phone's clock was ahead" : ""}`;
      tb.append(h("tr", {}, [h("td", { text: when }), h("td", { text: `${r.done === false ? "unticked: " : ""}${text}` }), h("td", { text: r.by }), h("td", { text: r.state })]));
    }
    t.append(tb);
    body.append(h("div", { class: "table-wrap" }, [t]));
  });
  return box;
}
