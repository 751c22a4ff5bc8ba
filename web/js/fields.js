// Input fields that parse what the user types and show the error at the field.

import { h } from "./dom.js";
import { EntryError, inputLength, lengthUnit, parseLength, parseNumber } from "./units.js";

let seq = 0;

export function showFieldError(input, message) {
  const wrap = input.closest(".field");
  const err = wrap?.querySelector(".field-error");
  if (!err) return;
  if (message) {
    input.setAttribute("aria-invalid", "true");
    err.textContent = message;
    err.hidden = false;
  } else {
    input.removeAttribute("aria-invalid");
    err.textContent = "";
    err.hidden = true;
  }
}

/**
 * A labelled input. parse(text) returns the value or throws EntryError; onValid(value) is called for each
 * valid entry as the user types.
 */
export function field({ label, value = "", parse, onValid, fieldPath = null, hint = null, type = "text", inputmode = null, testid = null, cls = "" }) {
  const id = `f${++seq}`;
  const input = h("input", { id, type, value, autocomplete: "off", spellcheck: "false", inputmode, "data-field": fieldPath, "data-testid": testid, "aria-describedby": `${id}-err` });
  const wrap = h("div", { class: `field ${cls}` }, [
    h("label", { for: id, text: label }),
    input,
    hint ? h("small", { class: "hint", text: hint }) : null,
    h("p", { class: "field-error", id: `${id}-err`, hidden: true, "data-testid": testid ? `${testid}-error` : null }),
  ]);
  const check = () => {
    try {
      const v = parse(input.value);
      showFieldError(input, null);
      return { ok: true, value: v };
    } catch (e) {
      showFieldError(input, e instanceof EntryError ? e.detail : e.message);
      return { ok: false };
    }
  };
  input.addEventListener("input", () => {
    const r = check();
    if (r.ok && onValid) onValid(r.value);
  });
  input.addEventListener("blur", () => {
    const r = check();
    if (r.ok && parse.normalise) input.value = parse.normalise(r.value);
  });
  wrap.check = check;
  wrap.input = input;
  return wrap;
}

export function lengthField({ label, metres, onValid, fieldPath, min = 0, max = 500, testid, hint, units, cls }) {
  const parse = (t) => parseLength(t, { units, min, max });
  parse.normalise = (v) => inputLength(v, units);
  return field({ label: `${label} (${lengthUnit(units)})`, value: inputLength(metres, units), parse, onValid, fieldPath, testid, hint, cls });
}

export function coordField({ label, metres, onValid, fieldPath, testid, units }) {
  const parse = (t) => parseLength(t, { units, min: -5000, max: 5000, allowNegative: true });
  parse.normalise = (v) => inputLength(v, units);
  return field({ label: `${label} (${lengthUnit(units)})`, value: inputLength(metres, units), parse, onValid, fieldPath, testid, cls: "narrow" });
}

export function numberField({ label, value, onValid, fieldPath, min = null, max = null, what = "a number", testid, hint, integer = false, cls }) {
  return field({ label, value: value ?? "", parse: (t) => parseNumber(t, { min, max, what, integer }), onValid, fieldPath, testid, hint, inputmode: "decimal", cls });
}

export function selectField({ label, value, options, onChange, fieldPath, testid }) {
  const id = `f${++seq}`;
  const sel = h("select", { id, "data-field": fieldPath, "data-testid": testid });
  for (const [v, text] of options) sel.append(h("option", { value: v, text }));
  sel.value = value;
  sel.addEventListener("change", () => onChange(sel.value));
  const wrap = h("div", { class: "field" }, [h("label", { for: id, text: label }), sel, h("p", { class: "field-error", hidden: true })]);
  wrap.input = sel;
  return wrap;
}
