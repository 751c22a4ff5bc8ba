// The kit a deployment is planned with: wire, coax, balun mass, rope, pull, masts. It can be stored as the
// operator's kit on the laptop (PUT /api/kit), which new deployments start from.

import { clear, h } from "./dom.js";
import { field, lengthField, numberField, selectField } from "./fields.js";
import { EntryError, parseNumber } from "./units.js";
import { COAX, coaxWord, conductorWord, CONDUCTORS, count } from "./words.js";
const DEFAULT_JACKET_PERMITTIVITY = 3.5; // PVC, typical (from memory; cable makers quote 3–4)
const TEMPERS = [["", "not known (taken as soft)"], ["soft", "soft-drawn"], ["hard", "hard-drawn"]];

/** A number the plan may do without: blank removes it (the plan then uses its default, and says so). */
function optionalNumber({ label, value, min, max, what, fieldPath, testid, hint, onValue }) {
  return field({
    label, value: value ?? "", fieldPath, testid, hint, inputmode: "decimal",
    parse: (t) => (String(t ?? "").trim() === "" ? null : parseNumber(t, { min, max, what })),
    onValid: onValue,
  });
}

/** Set or remove an optional key. */
function put(obj, key, v) {
  if (v === null) delete obj[key];
  else obj[key] = v;
}

export function kitEditor(app) {
  const st = app.state;
  const units = st.units;
  const kit = st.dep.kit ?? (st.dep.kit = {});
  const box = h("details", { class: "card", "data-testid": "kit", open: !kit.wire || st.kitOpen === true });
  box.addEventListener("toggle", () => (st.kitOpen = box.open));
  box.append(h("summary", { text: kit.wire ? `Kit: ${kit.wire.diameter_mm} mm ${conductorWord(kit.wire.conductor)} wire, ${kit.coax?.class ? `${coaxWord(kit.coax.class)} coax` : "coax"}, ${count((kit.masts ?? []).length, "mast")}` : "Kit: tell fieldkit what you carry" }));
  const set = (fn) => app.change((d) => fn((d.kit = d.kit ?? {})));
  const wire = () => (kit.wire = kit.wire ?? { conductor: "copper" });
  const grid = h("div", { class: "grid-form" });
  grid.append(numberField({ label: "Wire diameter (mm)", value: kit.wire?.diameter_mm ?? "", min: 0.2, max: 6, what: "a diameter in mm", fieldPath: "kit.wire.diameter_mm", testid: "kit-wire-mm", onValid: (v) => set(() => (wire().diameter_mm = v)) }));
  grid.append(selectField({ label: "Conductor", value: kit.wire?.conductor ?? "copper", options: CONDUCTORS, fieldPath: "kit.wire.conductor", onChange: (v) => {
    set(() => {
      wire().conductor = v;
      if (v !== "copper") delete wire().temper; // the temper is copper's only
    });
    app.render();
  } }));
  grid.append(numberField({
    label: "Jacket thickness (mm, 0 = bare)", value: kit.wire?.insulation?.thickness_mm ?? 0, min: 0, max: 5, what: "a thickness in mm", fieldPath: "kit.wire.insulation.thickness_mm",
    onValid: (v) => set(() => {
      if (v === 0) delete wire().insulation;
      else wire().insulation = { thickness_mm: v, relative_permittivity: wire().insulation?.relative_permittivity ?? DEFAULT_JACKET_PERMITTIVITY };
    }),
  }));
  grid.append(selectField({ label: "Coax", value: kit.coax?.class ?? "rg-58", options: COAX, fieldPath: "kit.coax.class", onChange: (v) => set(() => (kit.coax = { ...(kit.coax ?? {}), class: v })) }));
  grid.append(lengthField({ label: "Coax length", metres: kit.coax?.length_m ?? null, units, min: 1, max: 500, fieldPath: "kit.coax.length_m", onValid: (v) => set(() => (kit.coax = { class: kit.coax?.class ?? "rg-58", ...(kit.coax ?? {}), length_m: +v.toFixed(2) })) }));
  grid.append(numberField({ label: "Balun or centre insulator (kg)", value: kit.feedpoint_mass_kg ?? "", min: 0, max: 10, what: "a mass in kg", fieldPath: "kit.feedpoint_mass_kg", onValid: (v) => set(() => (kit.feedpoint_mass_kg = v)) }));
  grid.append(lengthField({ label: "Rope", metres: kit.rope?.length_m ?? null, units, min: 1, max: 2000, fieldPath: "kit.rope.length_m", onValid: (v) => set(() => (kit.rope = { ...(kit.rope ?? {}), length_m: +v.toFixed(2) })) }));
  grid.append(numberField({ label: "Pull on the wire (N)", value: kit.tension_n ?? "", min: 5, max: 2000, what: "a force in newtons", fieldPath: "kit.tension_n", hint: "a firm hand pull is about 60 N", onValid: (v) => set(() => (kit.tension_n = v)) }));
  box.append(grid);

  // what the wire, ropes and guys must hold (issue 14): the plan warns when a load exceeds them
  box.append(h("h4", { text: "Strength" }));
  const strength = h("div", { class: "grid-form", "data-testid": "kit-strength" });
  if ((kit.wire?.conductor ?? "copper") === "copper") {
    strength.append(selectField({ label: "Copper wire temper", value: kit.wire?.temper ?? "", options: TEMPERS, fieldPath: "kit.wire.temper", testid: "kit-wire-temper", onChange: (v) => set(() => put(wire(), "temper", v || null)) }));
  }
  strength.append(optionalNumber({ label: "Rope working load (N)", value: kit.rope?.working_load_n, min: 1, max: 100000, what: "a force in newtons", fieldPath: "kit.rope.working_load_n", testid: "kit-rope-wll", hint: "from the maker's label; blank: estimated from the diameter", onValue: (v) => set(() => put((kit.rope = kit.rope ?? {}), "working_load_n", v)) }));
  strength.append(optionalNumber({ label: "Weak link breaks at (N)", value: kit.weak_link_n, min: 1, max: 100000, what: "a force in newtons", fieldPath: "kit.weak_link_n", testid: "kit-weak-link", onValue: (v) => set(() => put(kit, "weak_link_n", v)) }));
  strength.append(optionalNumber({ label: "Check for wind of (m/s)", value: kit.design_wind_m_s, min: 0, max: 60, what: "a wind speed in m/s", fieldPath: "kit.design_wind_m_s", testid: "kit-design-wind", hint: "blank: a gale, 17.2 m/s", onValue: (v) => set(() => put(kit, "design_wind_m_s", v)) }));
  box.append(strength);

  box.append(h("h4", { text: "Masts" }));
  const masts = h("div", { class: "cards" });
  (kit.masts ?? []).forEach((m, i) => {
    const base = `kit.masts[${i}]`;
    masts.append(h("div", { class: "card", "data-testid": `mast-${m.id}` }, [
      h("div", { class: "card-head" }, [h("b", { text: m.id }), h("span", { class: "muted", text: m.note ?? "" }),
        h("button", { type: "button", class: "danger small", text: "Remove", on: { click: () => { set((k) => k.masts.splice(i, 1)); app.render(); } } })]),
      h("div", { class: "grid-form" }, [
        lengthField({ label: "Height", metres: m.height_m, units, min: 1, max: 60, fieldPath: `${base}.height_m`, onValid: (v) => set((k) => (k.masts[i].height_m = +v.toFixed(2))) }),
        numberField({ label: "Top load (kg)", value: m.top_load_kg, min: 0, max: 200, what: "a mass in kg", fieldPath: `${base}.top_load_kg`, onValid: (v) => set((k) => (k.masts[i].top_load_kg = v)) }),
        numberField({ label: "Guys", value: m.guys, min: 0, max: 12, integer: true, what: "a number of guys", fieldPath: `${base}.guys`, onValid: (v) => set((k) => (k.masts[i].guys = v)) }),
        optionalNumber({ label: "Wind rating (m/s)", value: m.wind_limit_m_s, min: 1, max: 60, what: "a wind speed in m/s", fieldPath: `${base}.wind_limit_m_s`, testid: `mast-${m.id}-wind`, hint: "the maker's; blank: 10.8 m/s", onValue: (v) => set((k) => put(k.masts[i], "wind_limit_m_s", v)) }),
        optionalNumber({ label: "Guy cord working load (N)", value: m.guy_rope?.working_load_n, min: 1, max: 100000, what: "a force in newtons", fieldPath: `${base}.guy_rope.working_load_n`, testid: `mast-${m.id}-guy-wll`, hint: "blank: the guys are the kit's rope", onValue: (v) => set((k) => put(k.masts[i], "guy_rope", v === null ? null : { working_load_n: v })) }),
      ]),
    ]));
  });
  box.append(masts);
  const mid = field({ label: "New mast name", value: "", testid: "kit-mast-id", parse: (t) => {
    const v = t.trim();
    if (!v) throw new EntryError("give the mast a short name, e.g. M3");
    if ((kit.masts ?? []).some((m) => m.id === v) || (st.dep.site.supports ?? []).some((sp) => sp.id === v)) throw new EntryError(`${v} is already used`);
    return v;
  } });
  const mh = lengthField({ label: "Height", metres: null, units, min: 1, max: 60, testid: "kit-mast-height" });
  const add = h("button", { type: "button", class: "primary", text: "Add mast" });
  add.addEventListener("click", () => {
    const a = mid.check();
    const b = mh.check();
    if (!a.ok || !b.ok) return;
    set((k) => (k.masts = [...(k.masts ?? []), { id: a.value, kind: "mast", height_m: +b.value.toFixed(2), top_load_kg: 2, guys: 3 }]));
    app.render();
  });
  box.append(h("div", { class: "grid-form" }, [mid, mh, add]));

  const out = h("p", { class: "note", hidden: true, "data-testid": "kit-stored" });
  const store = h("button", { type: "button", text: "Store as the operator's kit on this laptop", "data-testid": "kit-store" });
  store.addEventListener("click", async () => {
    out.hidden = false;
    try {
      await app.call(() => app.api.request("PUT", "/api/kit", structuredClone(st.dep.kit)));
      clear(out).append("Stored: new deployments start from this kit.");
    } catch (e) {
      app.reportFieldError(e);
      clear(out).append(`Not stored: ${e.message}`);
    }
  });
  box.append(h("div", { class: "row" }, [store]), out);
  return box;
}
