// Site: the supports, the power lines, the ground and the place; the to-scale sketch; the measuring helpers.

import { clear, h } from "./dom.js";
import { coordField, field, lengthField, numberField, selectField, showFieldError } from "./fields.js";
import { kitEditor } from "./kit.js";
import { siteSketch } from "./sketch.js";
import { EntryError, formatLength } from "./units.js";
import { FORMS, formWord, GROUNDS, hazardNames, SUPPORT_KINDS as KINDS } from "./words.js";

export { showFieldError };

const EYE_HEIGHT_M = 1.6; // typical standing eye height, common practice for clinometer readings
const PACE_M_DEFAULT = 0.75; // one step of an adult walking on rough ground, common practice

function chosenOption(app) {
  return app.state.plan?.options?.[app.state.chosen] ?? null;
}

export function refresh(app, panel) {
  const holder = panel.querySelector("[data-sketch]");
  if (holder) clear(holder).append(siteSketch(app.state.dep, chosenOption(app), app.state.units));
  const status = panel.querySelector("[data-plan-status]");
  if (status) clear(status).append(planStatus(app));
}

function planStatus(app) {
  const st = app.state;
  const opt = chosenOption(app);
  if (st.dirty) return h("p", { class: "note warn", "data-testid": "plan-status", text: "Changes not planned yet: press Save and plan (it takes a while: every option is modelled)." });
  if (st.planError && !opt) return h("p", { class: "note warn", "data-testid": "plan-status", text: st.planError });
  if (!opt) return h("p", { class: "note", "data-testid": "plan-status", text: "No plan yet." });
  const heights = Object.entries(opt.rope_heights_m ?? {}).map(([id, m]) => `${id} ${formatLength(m, { units: st.units, digits: 1 })}`);
  return h("p", { class: "note ok", "data-testid": "plan-status" }, [
    h("b", { text: `Plan: ${formWord(opt.form)} on ${opt.frequency_mhz} MHz` }),
    ` ${opt.supports_used.length > 1 ? "between" : "on"} ${opt.supports_used.join(" and ")}; rope heights ${heights.join(", ")}.`,
    st.planError ? h("span", { class: "warn", text: ` ${st.planError}` }) : null,
  ]);
}

export function render(app, panel) {
  const st = app.state;
  const dep = st.dep;
  const units = st.units;
  clear(panel);
  panel.append(h("h2", { text: `Site — ${dep.site?.name || dep.name}` }));
  panel.append(h("div", { class: "sketch-holder", "data-sketch": "1" }, [siteSketch(dep, chosenOption(app), units)]));
  panel.append(h("p", { class: "legend-line" }, [
    h("span", { class: "key key-support" }), "support ", h("span", { class: "key key-used" }), "used by the plan ",
    h("span", { class: "key key-unsafe" }), "unsafe ", h("span", { class: "key key-wire" }), "wire ", h("span", { class: "key key-rope" }), "rope ", h("span", { class: "key key-keepout" }), "keep-out ", h("span", { class: "key key-power" }), "power line",
  ]));
  panel.append(h("div", { "data-plan-status": "1" }, [planStatus(app)]));
  panel.append(h("div", { class: "row" }, [h("button", { type: "button", class: "primary", "data-testid": "save-plan", text: "Save and plan", on: { click: () => app.savePlan() } })]));

  // Supports
  const supports = dep.site.supports ?? (dep.site.supports = []);
  const list = h("div", { class: "cards", "data-testid": "support-list" });
  supports.forEach((sp, i) => list.append(supportCard(app, sp, i)));
  panel.append(h("h3", { text: `Supports (${supports.length})` }), list);
  panel.append(addSupportForm(app));
  panel.append(helpers(app));
  panel.append(powerLines(app));
  panel.append(placeForm(app));
  panel.append(kitEditor(app));
}

function supportCard(app, sp, i) {
  const units = app.state.units;
  const base = `site.supports[${i}]`;
  const upd = (fn) => {
    app.change((dep) => fn(dep.site.supports[i]));
    refresh(app, document.getElementById("sec-site"));
  };
  const card = h("div", { class: `card support-card ${sp.unsafe ? "is-unsafe" : ""}`, "data-testid": `support-${sp.id}` });
  card.append(h("div", { class: "card-head" }, [
    h("b", { class: "support-id", text: sp.id }),
    h("span", { class: "muted", text: sp.note || "" }),
    h("button", {
      type: "button", class: "danger small", "data-testid": `remove-${sp.id}`, text: "Remove",
      on: { click: () => { if (confirm(`Remove ${sp.id}?`)) { app.change((dep) => dep.site.supports.splice(i, 1)); app.render(); } } },
    }),
  ]));
  const grid = h("div", { class: "grid-form" });
  grid.append(selectField({ label: "Kind", value: sp.kind || "tree", options: KINDS, fieldPath: `${base}.kind`, onChange: (v) => upd((s) => (s.kind = v)) }));
  grid.append(lengthField({ label: "Rope height", metres: sp.height_m, units, min: 0.5, max: 60, fieldPath: `${base}.height_m`, testid: `height-${sp.id}`, onValid: (v) => upd((s) => (s.height_m = v)) }));
  grid.append(coordField({ label: "x east", metres: sp.x_m, units, fieldPath: `${base}.x_m`, testid: `x-${sp.id}`, onValid: (v) => upd((s) => (s.x_m = v)) }));
  grid.append(coordField({ label: "y north", metres: sp.y_m, units, fieldPath: `${base}.y_m`, testid: `y-${sp.id}`, onValid: (v) => upd((s) => (s.y_m = v)) }));
  const unsafe = h("input", { type: "checkbox", id: `unsafe-${sp.id}`, checked: Boolean(sp.unsafe), "data-testid": `unsafe-${sp.id}`, "data-field": `${base}.unsafe` });
  unsafe.addEventListener("change", () => {
    upd((s) => (s.unsafe = unsafe.checked));
    card.classList.toggle("is-unsafe", unsafe.checked);
  });
  grid.append(h("div", { class: "field check" }, [unsafe, h("label", { for: `unsafe-${sp.id}`, text: "Unsafe — do not use (dead, loose, near a hazard)" })]));
  card.append(grid);
  return card;
}

function addSupportForm(app) {
  const st = app.state;
  const units = st.units;
  const form = h("form", { class: "card add-support", "data-testid": "add-support", novalidate: true });
  form.append(h("h3", { text: "Add a support" }));
  const grid = h("div", { class: "grid-form" });
  const nextId = () => {
    const ids = new Set((st.dep.site.supports ?? []).map((sp) => sp.id));
    for (let n = 1; ; n++) if (!ids.has(`S${n}`)) return `S${n}`;
  };
  const id = field({ label: "Name", value: nextId(), testid: "new-id", fieldPath: "new.id", parse: (t) => {
    const v = t.trim();
    if (!v) throw new EntryError("give the support a short name, e.g. T5");
    if (v.length > 20) throw new EntryError("at most 20 characters");
    if ((st.dep.site.supports ?? []).some((sp) => sp.id === v)) throw new EntryError(`${v} is already used`);
    return v;
  } });
  let kind = "tree";
  const kindSel = selectField({ label: "Kind", value: kind, options: KINDS, testid: "new-kind", onChange: (v) => (kind = v) });
  const height = lengthField({ label: "Rope height", metres: null, units, min: 0.5, max: 60, testid: "new-height", fieldPath: "new.height_m", hint: "e.g. 12 m, 40 ft" });
  grid.append(id, kindSel, height);
  form.append(grid);

  // position: by x/y, from another support by distance and bearing, or by paces
  let mode = "xy";
  const modes = h("div", { class: "segmented", role: "radiogroup", "aria-label": "Position by" });
  const blocks = {};
  for (const [v, text] of [["xy", "x / y"], ["bearing", "from a support"], ["paces", "paces"]]) {
    const b = h("button", { type: "button", role: "radio", "aria-checked": String(v === mode), "data-testid": `mode-${v}`, text });
    b.addEventListener("click", () => {
      mode = v;
      for (const x of modes.children) x.setAttribute("aria-checked", String(x === b));
      for (const [k, el] of Object.entries(blocks)) el.hidden = k !== mode;
    });
    modes.append(b);
  }
  form.append(h("p", { class: "label", text: "Position by" }), modes);
  const x = coordField({ label: "x east", metres: null, units, testid: "new-x", fieldPath: "new.x_m" });
  const y = coordField({ label: "y north", metres: null, units, testid: "new-y", fieldPath: "new.y_m" });
  blocks.xy = h("div", { class: "grid-form" }, [x, y]);
  const refOptions = () => [["__origin", "reference point 0,0"], ...(st.dep.site.supports ?? []).map((sp) => [sp.id, sp.id])];
  let refB = "__origin";
  const refSelB = selectField({ label: "From", value: refB, options: refOptions(), testid: "new-from", onChange: (v) => (refB = v) });
  const dist = lengthField({ label: "Distance", metres: null, units, min: 0, max: 1000, testid: "new-distance", fieldPath: "new.distance" });
  const bearing = numberField({ label: "Bearing (° from north)", value: "", min: 0, max: 360, what: "a compass bearing in degrees", testid: "new-bearing", fieldPath: "new.bearing" });
  blocks.bearing = h("div", { class: "grid-form", hidden: true }, [refSelB, dist, bearing]);
  let refP = "__origin";
  const refSelP = selectField({ label: "From", value: refP, options: refOptions(), testid: "new-pace-from", onChange: (v) => (refP = v) });
  const paces = numberField({ label: "Paces", value: "", min: 0, max: 2000, what: "a number of paces", testid: "new-paces", fieldPath: "new.paces" });
  const paceLen = lengthField({ label: "One pace", metres: Number(localStorage.getItem("fieldkit.pace_m")) || PACE_M_DEFAULT, units, min: 0.2, max: 2, testid: "new-pace-length" });
  const paceBearing = numberField({ label: "Bearing (° from north)", value: "", min: 0, max: 360, what: "a compass bearing in degrees", testid: "new-pace-bearing" });
  blocks.paces = h("div", { class: "grid-form", hidden: true }, [refSelP, paces, paceLen, paceBearing]);
  form.append(blocks.xy, blocks.bearing, blocks.paces);
  const err = h("p", { class: "form-error", "data-testid": "add-error", hidden: true });
  form.append(err, h("button", { type: "submit", class: "primary", "data-testid": "add-support-submit", text: "Add support" }));

  const from = (ref) => {
    if (ref === "__origin") return [0, 0];
    const sp = st.dep.site.supports.find((v) => v.id === ref);
    return [sp.x_m, sp.y_m];
  };
  form.addEventListener("submit", (ev) => {
    ev.preventDefault();
    err.hidden = true;
    const parts = [id, height];
    if (mode === "xy") parts.push(x, y);
    if (mode === "bearing") parts.push(dist, bearing);
    if (mode === "paces") parts.push(paces, paceLen, paceBearing);
    const vals = parts.map((p) => p.check());
    if (vals.some((v) => !v.ok)) {
      err.textContent = "Fix the marked fields first.";
      err.hidden = false;
      return;
    }
    let pos;
    if (mode === "xy") pos = [vals[2].value, vals[3].value];
    else {
      const [d, b, ref] = mode === "bearing" ? [vals[2].value, vals[3].value, refB] : [vals[2].value * vals[3].value, vals[4].value, refP];
      if (mode === "paces") localStorage.setItem("fieldkit.pace_m", String(vals[3].value));
      const [x0, y0] = from(ref);
      const rad = (b * Math.PI) / 180;
      pos = [+(x0 + d * Math.sin(rad)).toFixed(2), +(y0 + d * Math.cos(rad)).toFixed(2)];
    }
    const sp = { id: vals[0].value, kind, height_m: +vals[1].value.toFixed(3), x_m: pos[0], y_m: pos[1] };
    app.change((dep) => dep.site.supports.push(sp));
    app.render();
    document.querySelector('[data-testid="new-id"] input, [data-testid="new-id"]')?.focus?.();
  });
  return form;
}

function helpers(app) {
  const units = app.state.units;
  const box = h("details", { class: "card helpers", "data-testid": "helpers" });
  box.append(h("summary", { text: "Measuring helpers: clinometer and paces" }));
  // Clinometer: height = distance × tan(angle) + eye height (right-triangle, level ground).
  const out = h("p", { class: "result", "data-testid": "clino-result", text: "—" });
  let d = null;
  let a = null;
  let eye = EYE_HEIGHT_M;
  const calc = () => {
    if (d === null || a === null) return;
    const hM = d * Math.tan((a * Math.PI) / 180) + eye;
    out.textContent = `Branch height ≈ ${formatLength(hM, { units, digits: 1 })}`;
    out.dataset.metres = String(hM);
  };
  box.append(h("h4", { text: "Clinometer" }), h("p", { class: "hint", text: "Stand on level ground, measure or pace the distance to the trunk, read the angle up to the branch." }));
  box.append(h("div", { class: "grid-form" }, [
    lengthField({ label: "Distance to trunk", metres: null, units, min: 0.5, max: 300, testid: "clino-distance", onValid: (v) => { d = v; calc(); } }),
    numberField({ label: "Angle up (°)", value: "", min: 0, max: 89, what: "an angle in degrees", testid: "clino-angle", onValid: (v) => { a = v; calc(); } }),
    lengthField({ label: "Eye height", metres: EYE_HEIGHT_M, units, min: 0, max: 3, testid: "clino-eye", onValid: (v) => { eye = v; calc(); } }),
  ]), out);
  // Paces: distance = paces × pace length; calibrate pace length on a known distance.
  const pout = h("p", { class: "result", "data-testid": "pace-result", text: "—" });
  let known = null;
  let counted = null;
  const pcalc = () => {
    if (known === null || !counted) return;
    const pace = known / counted;
    localStorage.setItem("fieldkit.pace_m", String(pace));
    pout.textContent = `Your pace ≈ ${formatLength(pace, { units, digits: 2 })} (stored for "paces")`;
  };
  box.append(h("h4", { text: "Pace length" }), h("p", { class: "hint", text: "Walk a known distance (a rope, a tape) and count your paces." }));
  box.append(h("div", { class: "grid-form" }, [
    lengthField({ label: "Known distance", metres: null, units, min: 1, max: 500, testid: "pace-known", onValid: (v) => { known = v; pcalc(); } }),
    numberField({ label: "Paces counted", value: "", min: 1, max: 2000, what: "a number of paces", testid: "pace-count", onValid: (v) => { counted = v; pcalc(); } }),
  ]), pout);
  return box;
}

function powerLines(app) {
  const st = app.state;
  const units = st.units;
  const hazards = st.dep.site.hazards ?? (st.dep.site.hazards = []);
  const box = h("div", { class: "card", "data-testid": "power-lines" });
  box.append(h("h3", { text: "Power lines" }));
  box.append(h("p", { class: "caution", text: "Keep every wire, rope and throw line well clear of power lines: a line falling or swinging onto one can kill. The clearances fieldkit checks are a minimum, not a permission — follow local rules." }));
  const names = hazardNames(hazards);
  hazards.forEach((hz, i) => {
    if (hz.kind !== "power_line") return;
    const [a, b] = hz.points_m;
    box.append(h("div", { class: "row hazard-row", "data-testid": `power-line-${i}` }, [
      h("span", {}, [h("b", { "data-testid": `hazard-name-${i}`, text: names[i] }), `: from (${formatLength(a[0], { units, digits: 0 })}, ${formatLength(a[1], { units, digits: 0 })}) to (${formatLength(b[0], { units, digits: 0 })}, ${formatLength(b[1], { units, digits: 0 })}), ${formatLength(hz.height_m, { units, digits: 1 })} high${hz.note ? ` — ${hz.note}` : ""}`]),
      h("button", { type: "button", class: "danger small", text: "Remove", on: { click: () => { app.change((dep) => dep.site.hazards.splice(i, 1)); app.render(); } } }),
    ]));
  });
  const f = {
    x1: coordField({ label: "From x", metres: null, units, testid: "pl-x1", fieldPath: "new_hazard.x1" }),
    y1: coordField({ label: "From y", metres: null, units, testid: "pl-y1", fieldPath: "new_hazard.y1" }),
    x2: coordField({ label: "To x", metres: null, units, testid: "pl-x2", fieldPath: "new_hazard.x2" }),
    y2: coordField({ label: "To y", metres: null, units, testid: "pl-y2", fieldPath: "new_hazard.y2" }),
    hgt: lengthField({ label: "Height", metres: null, units, min: 1, max: 100, testid: "pl-height", fieldPath: "new_hazard.height_m" }),
  };
  const form = h("form", { class: "grid-form", novalidate: true, "data-testid": "add-power-line" }, Object.values(f));
  form.append(h("button", { type: "submit", class: "primary", text: "Add power line", "data-testid": "add-power-line-submit" }));
  form.addEventListener("submit", (ev) => {
    ev.preventDefault();
    const v = Object.fromEntries(Object.entries(f).map(([k, el]) => [k, el.check()]));
    if (Object.values(v).some((r) => !r.ok)) return;
    if (v.x1.value === v.x2.value && v.y1.value === v.y2.value) {
      showFieldError(f.x2.input, "the two ends must differ");
      return;
    }
    app.change((dep) => dep.site.hazards.push({ kind: "power_line", points_m: [[v.x1.value, v.y1.value], [v.x2.value, v.y2.value]], height_m: v.hgt.value }));
    app.render();
  });
  box.append(h("h4", { text: "Add a power line (two points on it)" }), form);
  return box;
}

function placeForm(app) {
  const st = app.state;
  const dep = st.dep;
  const box = h("details", { class: "card", "data-testid": "place", open: (dep.site.supports ?? []).length === 0 || st.placeOpen === true });
  box.addEventListener("toggle", () => (st.placeOpen = box.open));
  box.append(h("summary", { text: "Place, ground, channels and schedule" }));
  const sky = dep.sky ?? (dep.sky = { site: {}, date: new Date().toISOString().slice(0, 10), solar: { f107: 120 } });
  const grid = h("div", { class: "grid-form" });
  const setLatLon = (k, v) => app.change((d) => {
    d.site[k] = v;
    d.sky.site = d.sky.site ?? {};
    d.sky.site[k] = v;
  });
  grid.append(field({ label: "Name", value: dep.name, fieldPath: "name", parse: (t) => { if (!t.trim()) throw new EntryError("give the deployment a name"); return t.trim(); }, onValid: (v) => app.change((d) => (d.name = v)) }));
  grid.append(numberField({ label: "Latitude (°N)", value: dep.site.lat_deg, min: -90, max: 90, what: "a latitude in degrees", fieldPath: "site.lat_deg", onValid: (v) => setLatLon("lat_deg", v) }));
  grid.append(numberField({ label: "Longitude (°E)", value: dep.site.lon_deg, min: -180, max: 180, what: "a longitude in degrees", fieldPath: "site.lon_deg", onValid: (v) => setLatLon("lon_deg", v) }));
  grid.append(field({ label: "Date (UTC day)", type: "date", value: sky.date, fieldPath: "sky.date", parse: (t) => { if (!/^\d{4}-\d{2}-\d{2}$/.test(t)) throw new EntryError("expected a date YYYY-MM-DD"); return t; }, onValid: (v) => app.change((d) => (d.sky.date = v)) }));
  grid.append(selectField({ label: "Ground", value: typeof dep.site.ground === "string" ? dep.site.ground : "average", options: GROUNDS, fieldPath: "site.ground", onChange: (v) => app.change((d) => (d.site.ground = v)) }));
  grid.append(field({
    label: "Channels (MHz, comma separated)", value: (dep.channels_mhz ?? []).join(", "), fieldPath: "channels_mhz", testid: "channels",
    parse: (t) => {
      const parts = t.split(/[,;\s]+/).filter(Boolean);
      if (!parts.length) throw new EntryError("enter at least one channel, e.g. 3.605, 5.3715");
      return parts.map((p) => {
        const v = Number(p.replace(",", "."));
        if (!/^\d*\.?\d+$/.test(p) || !(v >= 1.8 && v <= 30)) throw new EntryError(`channel "${p}": expected a frequency in MHz between 1.8 and 30`);
        return v;
      });
    },
    onValid: (v) => app.change((d) => { d.channels_mhz = v; d.sky.channels_mhz = v; }),
  }));
  const time = (t) => { if (!/^([01]\d|2[0-3]):[0-5]\d$/.test(t.trim())) throw new EntryError("expected a time HH:MM (UTC)"); return t.trim(); };
  grid.append(field({ label: "Schedule from (UTC)", value: dep.schedule?.start_utc ?? "16:00", fieldPath: "schedule.start_utc", parse: time, onValid: (v) => app.change((d) => { d.schedule = d.schedule ?? {}; d.schedule.start_utc = v; }) }));
  grid.append(field({ label: "Schedule to (UTC)", value: dep.schedule?.end_utc ?? "20:00", fieldPath: "schedule.end_utc", parse: time, onValid: (v) => app.change((d) => { d.schedule = d.schedule ?? {}; d.schedule.end_utc = v; }) }));
  grid.append(numberField({ label: "Transmit power (W)", value: dep.radio?.power_w ?? 100, min: 1, max: 1500, what: "a power in watts", fieldPath: "radio.power_w", onValid: (v) => app.change((d) => { d.radio = d.radio ?? {}; d.radio.power_w = v; }) }));
  grid.append(selectField({ label: "Antenna form", value: dep.form ?? "auto", options: FORMS, fieldPath: "form", onChange: (v) => app.change((d) => (d.form = v)) }));
  box.append(grid);
  return box;
}

