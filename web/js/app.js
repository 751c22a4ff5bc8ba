// The field app: state, section switching, saving and planning, the offline tick queue.

import { api, ApiError, onBusy, onSavedCopy, UnreachableError } from "./api.js";
import { clear, h } from "./dom.js";
import { kvGet, kvSet, newClientId } from "./store.js";
import { deploymentList, planInput, readChecks, readDeployment } from "./shapes.js";
import { currentUnits, setUnits } from "./units.js";
import * as queue from "./queue.js";
import * as site from "./site.js";
import * as sky from "./sky.js";
import * as wire from "./wire.js";
import * as mast from "./mast.js";
import * as checks from "./checks.js";
import * as card from "./card.js";

const SECTIONS = { site, sky, wire, mast, checks, card };
const SECTION_ORDER = ["site", "sky", "wire", "mast", "checks", "card"];
const REPLAY_EVERY_MS = 5000;

const app = {
  state: {
    units: currentUnits(),
    deployments: [],
    id: null,
    dep: null,
    revision: null,
    plan: null,
    planFor: null,
    planError: null,
    chosen: 0,
    sky: null,
    skyFor: null,
    skyError: null,
    checks: [],
    checksError: null,
    pending: [],
    online: true,
    fromCache: false,
    section: "site",
    extra: {},
  },
  api,
};

// ---------------------------------------------------------------- status, banner, busy
function setStatus() {
  const el = document.getElementById("status");
  const st = app.state;
  clear(el);
  el.append(h("span", { class: `dot ${st.online ? "ok" : "off"}`, "aria-hidden": "true" }));
  el.append(h("span", { "data-testid": "online-state", text: st.online ? "service connected" : "service unreachable — working from this device" }));
  if (st.pending.length) {
    el.append(h("span", { class: "pending-count", "data-testid": "pending-count", text: `${st.pending.length} ${st.pending.length === 1 ? "tick" : "ticks"} pending` }));
  }
  if (st.fromCache) el.append(h("span", { class: "cached", text: "saved copy" }));
}

export function showBanner(message, kind = "error") {
  const el = document.getElementById("banner");
  if (!message) {
    el.hidden = true;
    return;
  }
  el.hidden = false;
  el.className = `banner ${kind}`;
  clear(el).append(h("span", { text: message }), h("button", { type: "button", class: "close", text: "Close", on: { click: () => (el.hidden = true) } }));
}

onBusy((busy, label) => {
  const el = document.getElementById("busy");
  el.hidden = !busy;
  if (busy) document.getElementById("busy-text").textContent = label || "Working…";
});

function noteReachable(ok) {
  if (app.state.online !== ok) {
    app.state.online = ok;
    setStatus();
    if (ok) replay();
  }
}

let savedCopySeen = false;
onSavedCopy(() => {
  savedCopySeen = true;
  app.state.fromCache = true;
});

/** Run an API call, tracking whether the service is reachable. */
async function call(fn) {
  try {
    savedCopySeen = false;
    const out = await fn();
    noteReachable(!savedCopySeen);
    return out;
  } catch (e) {
    if (e instanceof UnreachableError) noteReachable(false);
    else noteReachable(true);
    throw e;
  }
}
app.call = call;

// ---------------------------------------------------------------- rendering
function render() {
  const st = app.state;
  for (const a of document.querySelectorAll("nav.sections a")) {
    a.classList.toggle("current", a.dataset.section === st.section);
    if (a.dataset.section === st.section) a.setAttribute("aria-current", "page");
    else a.removeAttribute("aria-current");
  }
  for (const name of SECTION_ORDER) {
    const panel = document.getElementById(`sec-${name}`);
    panel.hidden = name !== st.section;
  }
  const panel = document.getElementById(`sec-${st.section}`);
  if (!st.dep) {
    clear(panel).append(emptyState());
  } else {
    SECTIONS[st.section].render(app, panel);
  }
  renderDeploymentSelect();
  setStatus();
  document.getElementById("units-toggle").textContent = st.units === "imperial" ? "ft" : "m";
  document.getElementById("units-toggle").setAttribute("aria-pressed", String(st.units === "imperial"));
}
app.render = render;

/** Re-render only the current section's dependent parts (site sketch keeps its inputs). */
app.refresh = () => {
  const panel = document.getElementById(`sec-${app.state.section}`);
  const mod = SECTIONS[app.state.section];
  if (app.state.dep && mod.refresh) mod.refresh(app, panel);
  else render();
  setStatus();
};

function emptyState() {
  return h("div", { class: "empty" }, [
    h("h2", { text: "No deployment yet" }),
    h("p", { text: "A deployment is one planned raising of one antenna at one site. Start one here, then add the supports in Site." }),
    newDeploymentForm(),
  ]);
}

function newDeploymentForm() {
  const form = h("form", { class: "grid-form", "data-testid": "new-deployment" });
  const name = h("input", { id: "new-name", name: "name", required: true, autocomplete: "off", value: "", "data-testid": "new-name" });
  const kitSel = h("select", { id: "new-kit", "data-testid": "new-kit" }, [h("option", { value: "__service", text: "the operator's kit on this laptop" })]);
  for (const d of app.state.deployments) kitSel.append(h("option", { value: d.id, text: `the same kit as “${d.name}”` }));
  form.append(h("div", { class: "field" }, [h("label", { for: "new-name", text: "Name" }), name]));
  form.append(h("div", { class: "field" }, [h("label", { for: "new-kit", text: "Kit (wire, rope, coax, masts)" }), kitSel]));
  form.append(h("button", { type: "submit", class: "primary", "data-testid": "new-submit", text: "Start deployment" }));
  form.addEventListener("submit", async (ev) => {
    ev.preventDefault();
    await createDeployment(name.value.trim() || "New deployment", kitSel.value);
  });
  return form;
}

function renderDeploymentSelect() {
  const sel = document.getElementById("deployment-select");
  const st = app.state;
  clear(sel);
  for (const d of st.deployments) sel.append(h("option", { value: d.id, text: d.name }));
  if (st.draft && st.dep) sel.append(h("option", { value: st.id, text: `${st.dep.name} (not saved yet)` }));
  sel.append(h("option", { value: "__new", text: "+ New deployment" }));
  sel.value = st.id ?? "__new";
}

// ---------------------------------------------------------------- deployments
async function loadList() {
  try {
    const data = await call(api.listDeployments);
    app.state.deployments = deploymentList(data);
    await kvSet("deployments", app.state.deployments);
  } catch (e) {
    if (!(e instanceof UnreachableError)) showBanner(`Could not list deployments: ${e.message}`);
    app.state.deployments = (await kvGet("deployments")) ?? [];
  }
}

async function openDeployment(id) {
  const st = app.state;
  st.id = id;
  st.plan = null;
  st.planFor = null;
  st.planError = null;
  st.sky = null;
  st.skyFor = null;
  st.checks = [];
  st.chosen = 0;
  st.extra = {};
  st.fromCache = false;
  st.dirty = false;
  st.draft = false;
  try {
    localStorage.setItem("fieldkit.last", id);
  } catch {
    /* ignore */
  }
  if (id.startsWith("draft-")) {
    const saved = await kvGet(`dep:${id}`);
    if (saved) {
      Object.assign(st, { dep: saved.dep, revision: null, draft: true, dirty: true });
      render();
      return;
    }
  }
  try {
    const data = await call(() => api.getDeployment(id));
    const d = readDeployment(data);
    st.dep = d.dep;
    st.revision = d.revision;
    if (d.plan) {
      st.plan = d.plan;
      st.planFor = JSON.stringify(planInput(d.dep));
    } else if (d.planning) {
      st.planError = "The service is still planning this deployment: the plan appears here when it is done.";
      waitForPlan(id);
    } else if (d.planError) st.planError = d.planError.detail ?? String(d.planError.error);
    await kvSet(`dep:${id}`, { dep: st.dep, revision: st.revision });
  } catch (e) {
    const saved = await kvGet(`dep:${id}`);
    if (!saved) {
      st.dep = null;
      showBanner(e instanceof UnreachableError ? "The service cannot be reached and this deployment was never opened on this device." : `Could not open the deployment: ${e.message}`);
      render();
      return;
    }
    st.dep = saved.dep;
    st.revision = saved.revision;
    st.dirty = Boolean(saved.dirty);
    st.fromCache = true;
  }
  const savedView = await kvGet(`view:${id}`);
  if (savedView) {
    if (!st.plan && savedView.plan) {
      st.plan = savedView.plan;
      st.planFor = savedView.planFor;
    }
    if (savedView.sky) {
      st.sky = savedView.sky;
      st.skyFor = savedView.skyFor;
    }
    if (Number.isInteger(savedView.chosen)) st.chosen = savedView.chosen;
    if (savedView.checks) st.checks = savedView.checks;
  }
  st.pending = await queue.list();
  overlayPending();
  render();
  await loadChecks();
  render();
}
app.openDeployment = openDeployment;

const PLAN_POLL_MS = 3000;
/** A deployment the service is planning in the background (the demo on first start): look again. */
function waitForPlan(id) {
  setTimeout(async () => {
    const st = app.state;
    if (st.id !== id || st.plan) return;
    try {
      const d = readDeployment(await call(() => api.getDeployment(id)));
      if (st.id !== id) return;
      if (d.plan) {
        Object.assign(st, { plan: d.plan, planFor: JSON.stringify(planInput(d.dep)), planError: null, revision: d.revision, extra: {} });
        await saveView();
        await loadChecks();
        render();
        return;
      }
      if (!d.planning) {
        st.planError = d.planError?.detail ?? "The service has no plan for this deployment: press Save and plan in Site.";
        render();
        return;
      }
    } catch {
      /* unreachable for now: keep looking */
    }
    waitForPlan(id);
  }, PLAN_POLL_MS);
}

async function createDeployment(name, kitFrom = "__service") {
  let kit = {};
  try {
    if (kitFrom === "__service") {
      const out = (await call(api.kit)) ?? {};
      kit = out.kit ?? {};
    } else {
      kit = readDeployment(await call(() => api.getDeployment(kitFrom))).dep.kit ?? {};
    }
  } catch (e) {
    showBanner(`Could not read the kit: ${e.message}`);
    return;
  }
  if (!kit.wire) showBanner("That kit lists no wire yet: fill in the Kit at the end of Site before planning.", "warn");
  const today = new Date().toISOString().slice(0, 10);
  const dep = {
    name,
    site: { name, ground: "average", supports: [], hazards: [] },
    channels_mhz: [],
    form: "auto",
    kit,
    radio: { power_w: 100, mode: "ssb" },
    schedule: { start_utc: "16:00", end_utc: "20:00" },
    sky: { site: {}, date: today, solar: { f107: 120 }, channels_mhz: [] },
  };
  // A draft lives on this device until its first "Save and plan": the service stores a deployment
  // together with its plan, and a plan needs the place, the channels and two supports.
  const st = app.state;
  Object.assign(st, { id: `draft-${newClientId()}`, draft: true, dep, revision: null, plan: null, planFor: null, planError: null, sky: null, skyFor: null, checks: [], chosen: 0, extra: {}, dirty: true, fromCache: false });
  await kvSet(`dep:${st.id}`, { dep, revision: null, dirty: true, draft: true });
  st.section = "site";
  if (location.hash !== "#site") location.hash = "#site";
  render();
}

/**
 * Change the deployment: fn(dep) edits it in place. The change is kept on this device at once and drawn
 * at once; the plan (slow: the service models every option) runs on "Save and plan", or when the user
 * leaves Site for a section that shows the plan.
 */
app.change = (fn) => {
  fn(app.state.dep);
  app.state.dirty = true;
  kvSet(`dep:${app.state.id}`, { dep: app.state.dep, revision: app.state.revision, dirty: true });
  if (app.state.section === "site") site.refresh(app, document.getElementById("sec-site"));
};

let saving = null;
let saveAgain = false;
/** Save the deployment and run the plan; a change made meanwhile is saved right after. */
app.savePlan = async () => {
  if (saving) {
    saveAgain = true;
    return saving;
  }
  saving = (async () => {
    do {
      saveAgain = false;
      app.state.dirty = false;
      await saveAndPlan();
    } while (saveAgain);
  })();
  try {
    await saving;
  } finally {
    saving = null;
  }
};

async function saveAndPlan() {
  const st = app.state;
  let id = st.id;
  let justCreated = false;
  try {
    if (st.draft) {
      const made = await call(() => app.api.createDeployment(structuredClone(st.dep)));
      st.draft = false;
      id = st.id = String(made.id);
      localStorage.setItem("fieldkit.last", id);
      justCreated = true;
      await loadList();
      renderDeploymentSelect();
    }
    // Creating it ran the plan already; otherwise saving runs it.
    const out = justCreated ? await call(() => app.api.getDeployment(id)) : await call(() => app.api.saveDeployment(id, structuredClone(st.dep)));
    const d = readDeployment(out);
    st.revision = d.revision;
    st.plan = d.plan;
    st.planFor = d.plan ? JSON.stringify(planInput(st.dep)) : null;
    st.planError = d.plan ? null : d.planError?.detail ?? "The service returned no plan.";
    if (st.chosen >= (st.plan?.options?.length ?? 0)) st.chosen = 0;
    st.extra = {};
    await kvSet(`dep:${id}`, { dep: st.dep, revision: st.revision });
    await saveView();
    showBanner(null);
  } catch (e) {
    st.dirty = true;
    if (e instanceof UnreachableError) {
      showBanner("The service cannot be reached: the change is kept on this device; press Save and plan when it is back.", "warn");
      app.refresh();
      return;
    }
    st.planError = e.message;
    reportFieldError(e);
    app.refresh();
    return;
  }
  await loadChecks();
  app.refresh();
}

/** Show an API error at the input it names (data-field, or the nearest enclosing name), else in the banner. */
function reportFieldError(e) {
  if (e instanceof ApiError && e.field) {
    let name = e.field;
    while (name) {
      const input = document.querySelector(`[data-field="${CSS.escape(name)}"]`);
      if (input) {
        site.showFieldError(input, name === e.field ? e.detail : `${e.field}: ${e.detail}`);
        input.closest("details")?.setAttribute("open", "");
        input.scrollIntoView({ block: "center" });
        showBanner(`The service refused ${e.field}: ${e.detail}`);
        return;
      }
      const cut = name.search(/(\[\d+\]|\.[^.[\]]+)$/);
      name = cut > 0 ? name.slice(0, cut) : "";
    }
    // A field that is missing altogether ("kit.wire"): show it at the first input inside it.
    const inner = document.querySelector(`[data-field^="${CSS.escape(e.field)}."], [data-field^="${CSS.escape(e.field)}["]`);
    if (inner) {
      site.showFieldError(inner, `${e.field}: ${e.detail}`);
      inner.closest("details")?.setAttribute("open", "");
      inner.scrollIntoView({ block: "center" });
      showBanner(`The service refused ${e.field}: ${e.detail}`);
      return;
    }
  }
  showBanner(e.message);
}
app.reportFieldError = reportFieldError;

async function saveView() {
  const st = app.state;
  if (!st.id) return;
  await kvSet(`view:${st.id}`, { plan: st.plan, planFor: st.planFor, sky: st.sky, skyFor: st.skyFor, chosen: st.chosen, checks: st.checks });
}
app.saveView = saveView;

app.choose = async (index) => {
  app.state.chosen = index;
  app.state.extra = {};
  await saveView();
  render();
};

// ---------------------------------------------------------------- checks and the pending queue
/** Lay the ticks still waiting on this device over the items, in the order they were made. */
function overlayPending() {
  const st = app.state;
  for (const p of st.pending) {
    if (p.deployment_id !== st.id) continue;
    const item = st.checks.find((c) => c.id === p.item_id);
    if (item) Object.assign(item, { done: p.body.done, by: p.body.by, at: p.body.at });
  }
}

async function loadChecks() {
  const st = app.state;
  if (!st.id) return;
  try {
    const data = await call(() => api.checks(st.id));
    st.checks = readChecks(data);
    st.readiness = { ready: data?.ready_to_raise ?? null, raiseOk: data?.raise_ok ?? null, missing: data?.missing_checks ?? [] };
    st.checksError = null;
    await saveView();
  } catch (e) {
    st.checksError = e instanceof UnreachableError ? null : e.message;
  }
  st.pending = await queue.list();
  overlayPending();
}
app.loadChecks = loadChecks;

/** Tick (or untick) an item: queue it on the device first, then try to send it. */
app.tick = async (item, done, by) => {
  const st = app.state;
  try {
    await queue.add({ deployment_id: st.id, item_id: item.id, done, by, at: new Date().toISOString() });
  } catch (e) {
    showBanner(`This device could not keep the tick (${e.message}); nothing was sent. Free some browser storage and tick again.`);
    app.refresh();
    return;
  }
  st.pending = await queue.list();
  overlayPending();
  await saveView();
  app.refresh();
  await replay();
};

let replaying = null;
async function replay() {
  if (replaying) return replaying;
  replaying = (async () => {
    const { sent, failed, unreachable } = await queue.replay((e) => call(() => api.tick(e.deployment_id, e.item_id, e.body)));
    app.state.pending = await queue.list();
    for (const f of failed) showBanner(`A tick for "${f.entry.item_id}" was refused: ${f.error.message}`);
    if (sent && !unreachable) await loadChecks();
    app.refresh();
  })();
  try {
    await replaying;
  } finally {
    replaying = null;
  }
}
app.replay = replay;

// ---------------------------------------------------------------- header controls and routing
function go(section) {
  const st = app.state;
  st.section = SECTIONS[section] ? section : "site";
  render();
  window.scrollTo(0, 0);
  if (st.dep && st.dirty && ["wire", "mast", "checks", "card"].includes(st.section)) app.savePlan();
}

function setNight(on) {
  document.documentElement.classList.toggle("night", on);
  const b = document.getElementById("night-toggle");
  b.setAttribute("aria-pressed", String(on));
  b.textContent = on ? "Day" : "Night";
  document.querySelector('meta[name="theme-color"]').setAttribute("content", on ? "#1a0000" : "#1d4d3a");
  try {
    localStorage.setItem("fieldkit.night", on ? "1" : "0");
  } catch {
    /* ignore */
  }
}

async function start() {
  let night = false;
  try {
    night = localStorage.getItem("fieldkit.night") === "1";
  } catch {
    /* ignore */
  }
  setNight(night);
  document.getElementById("night-toggle").addEventListener("click", () => setNight(!document.documentElement.classList.contains("night")));
  document.getElementById("units-toggle").addEventListener("click", () => {
    app.state.units = app.state.units === "imperial" ? "metric" : "imperial";
    setUnits(app.state.units);
    render();
  });
  document.getElementById("help-toggle").addEventListener("click", () => {
    const help = document.getElementById("help");
    help.hidden = !help.hidden;
    document.getElementById("help-toggle").setAttribute("aria-expanded", String(!help.hidden));
    if (!help.hidden) help.scrollIntoView();
  });
  document.getElementById("deployment-select").addEventListener("change", async (ev) => {
    const v = ev.target.value;
    if (v === app.state.id) return;
    if (v === "__new") {
      app.state.dep = null;
      app.state.id = null;
      go("site");
    } else await openDeployment(v);
  });
  window.addEventListener("hashchange", () => go(location.hash.slice(1)));
  // Drawings take the screen's width when drawn: redraw after a rotation or a window resize.
  let lastWidth = window.innerWidth;
  let resizeTimer = null;
  window.addEventListener("resize", () => {
    clearTimeout(resizeTimer);
    resizeTimer = setTimeout(() => {
      if (Math.abs(window.innerWidth - lastWidth) < 60 || !app.state.dep) return;
      lastWidth = window.innerWidth;
      app.refresh();
    }, 300);
  });
  window.addEventListener("online", () => replay());
  setInterval(() => {
    if (app.state.pending.length) replay();
  }, REPLAY_EVERY_MS);

  if ("serviceWorker" in navigator && window.isSecureContext) {
    navigator.serviceWorker.register("sw.js").catch((e) => console.warn("service worker not registered", e));
  }
  const params = new URLSearchParams(location.search);
  app.state.section = SECTIONS[location.hash.slice(1)] ? location.hash.slice(1) : "site";
  app.state.pending = await queue.list();
  await loadList();
  let last = params.get("deployment");
  if (!last) {
    try {
      last = localStorage.getItem("fieldkit.last");
    } catch {
      last = null;
    }
  }
  const first = app.state.deployments.find((d) => d.id === last) ?? app.state.deployments[0];
  if (first) await openDeployment(first.id);
  else render();
  document.documentElement.dataset.ready = "1";
  if (app.state.pending.length) replay();
}

start().catch((e) => showBanner(`The app could not start: ${e.message}`));
