// Display units. Everything inside the app is SI (metres); only what the user reads or types is converted.

export const FOOT_M = 0.3048; // international foot, exact (1959 agreement)
export const KM_PER_MILE = 1.609344; // international mile, exact
const KG_PER_LB = 0.45359237; // international pound, exact

const KEY = "fieldkit.units";

export function currentUnits() {
  try {
    return localStorage.getItem(KEY) === "imperial" ? "imperial" : "metric";
  } catch {
    return "metric";
  }
}

export function setUnits(units) {
  try {
    localStorage.setItem(KEY, units);
  } catch {
    /* private mode: the switch still works for this page */
  }
}

export class EntryError extends Error {
  constructor(detail) {
    super(detail);
    this.detail = detail;
  }
}

const LENGTH_UNITS = {
  m: 1, metre: 1, metres: 1, meter: 1, meters: 1,
  cm: 0.01, mm: 0.001, km: 1000,
  ft: FOOT_M, foot: FOOT_M, feet: FOOT_M, "'": FOOT_M,
  in: 0.0254, inch: 0.0254, inches: 0.0254, '"': 0.0254,
  yd: 0.9144,
};

/** Parse a length typed by the user: "12 m", "40 ft", "12.5" (display unit), "38'", "12,5 m". Returns metres. */
export function parseLength(text, { units = currentUnits(), min = null, max = null, allowNegative = false } = {}) {
  const raw = String(text ?? "").trim();
  if (raw === "") throw new EntryError("enter a length, e.g. 12 m or 40 ft");
  const m = raw.replace(",", ".").match(/^([-+]?\d*\.?\d+(?:e[-+]?\d+)?)\s*([a-z'"]*)\.?$/i);
  if (!m) throw new EntryError(`"${raw}" is not a length; type e.g. 12 m, 40 ft or 12.5`);
  const value = Number(m[1]);
  const unitText = m[2].toLowerCase();
  let factor;
  if (unitText === "") factor = units === "imperial" ? FOOT_M : 1;
  else {
    factor = LENGTH_UNITS[unitText];
    if (factor === undefined) throw new EntryError(`unknown unit "${m[2]}"; use m or ft`);
  }
  const metres = value * factor;
  if (!Number.isFinite(metres)) throw new EntryError(`"${raw}" is not a finite length`);
  if (!allowNegative && metres < 0) throw new EntryError("a length cannot be negative");
  if (min !== null && metres < min) throw new EntryError(`must be at least ${formatLength(min, { units })}`);
  if (max !== null && metres > max) throw new EntryError(`must be at most ${formatLength(max, { units })}`);
  return metres;
}

/** Parse a plain number with optional bounds (bearing, paces, frequency). */
export function parseNumber(text, { min = null, max = null, what = "a number", integer = false } = {}) {
  const raw = String(text ?? "").trim().replace(",", ".");
  if (raw === "") throw new EntryError(`enter ${what}`);
  if (!/^[-+]?\d*\.?\d+(?:e[-+]?\d+)?$/i.test(raw)) throw new EntryError(`"${raw}" is not ${what}`);
  const v = Number(raw);
  if (!Number.isFinite(v)) throw new EntryError(`"${raw}" is not ${what}`);
  if (integer && !Number.isInteger(v)) throw new EntryError(`expected a whole number, got ${raw}`);
  if (min !== null && v < min) throw new EntryError(`must be at least ${min}`);
  if (max !== null && v > max) throw new EntryError(`must be at most ${max}`);
  return v;
}

export function lengthUnit(units = currentUnits()) {
  return units === "imperial" ? "ft" : "m";
}

export function toDisplayLength(metres, units = currentUnits()) {
  return units === "imperial" ? metres / FOOT_M : metres;
}

// Rounding half up on floor(x + 0.5 + 1e-9): the same arithmetic as fieldkit/readable.py, so a length the
// service and the app both write reads the same (e2e/test_words.py compares them).
const EPS = 1e-9;
const halfUp = (x) => Math.floor(x + 0.5 + EPS);

/** v with d decimals, halves up (toFixed rounds the binary value: 19.795 would read 19.79). */
export function fixed(v, d) {
  const n = halfUp(Math.abs(v) * 10 ** d);
  const text = d > 0 ? `${Math.floor(n / 10 ** d)}.${String(n % 10 ** d).padStart(d, "0")}` : String(n);
  return v < 0 && n !== 0 ? `-${text}` : text;
}

/** "12.3 m" or "40.4 ft". */
export function formatLength(metres, { units = currentUnits(), digits = null, unit = true } = {}) {
  if (metres === null || metres === undefined || !Number.isFinite(metres)) return "–";
  const v = toDisplayLength(metres, units);
  const d = digits ?? (Math.abs(v) < 10 ? 2 : 1);
  const s = fixed(v, d);
  return unit ? `${s} ${lengthUnit(units)}` : s;
}

const INCH_M = 0.0254; // international inch, exact
const FRACTIONS = ["", "¼", "½", "¾"];
const NBSP = "\u00a0"; // a tape reading never breaks across lines (as fieldkit.readable)

/** A length as a metric tape reads it: "20.53 m", "59 cm" (fieldkit.readable.tape_metric). */
export function tapeMetric(metres) {
  const cm = halfUp(Math.abs(metres) * 100);
  const sign = metres < 0 && cm ? "-" : "";
  if (cm < 100) return `${sign}${cm}${NBSP}cm`;
  return `${sign}${Math.floor(cm / 100)}.${String(cm % 100).padStart(2, "0")}${NBSP}m`;
}

/** A length as an imperial tape reads it: "67 ft 4½ in", "23¼ in" (fieldkit.readable.tape_imperial). */
export function tapeImperial(metres) {
  const q = halfUp((Math.abs(metres) / INCH_M) * 4);
  const sign = metres < 0 && q ? "-" : "";
  const feet = Math.floor(q / 48);
  const inches = Math.floor((q % 48) / 4);
  const frac = FRACTIONS[q % 4];
  const inch = inches === 0 && frac ? `${frac}${NBSP}in` : `${inches}${frac}${NBSP}in`;
  return feet ? `${sign}${feet}${NBSP}ft${NBSP}${inch}` : `${sign}${inch}`;
}

/** A length to cut or to trim, in the units shown, as a tape reads it. */
export function formatTape(metres, units = currentUnits()) {
  if (metres === null || metres === undefined || !Number.isFinite(metres)) return "–";
  return units === "imperial" ? tapeImperial(metres) : tapeMetric(metres);
}

/** The string the service made for the units shown: {metric, imperial} → one of them. */
export function pick(strings, units = currentUnits()) {
  return (units === "imperial" ? strings?.imperial : strings?.metric) ?? "–";
}

/** Value for an input box: short, no unit suffix needed, but with it the entry is unambiguous. */
export function inputLength(metres, units = currentUnits()) {
  if (metres === null || metres === undefined || !Number.isFinite(metres)) return "";
  const v = toDisplayLength(metres, units);
  return `${+v.toFixed(2)} ${lengthUnit(units)}`;
}

export function formatDistanceKm(km, units = currentUnits()) {
  if (!Number.isFinite(km)) return "–";
  return units === "imperial" ? `${(km / KM_PER_MILE).toFixed(0)} mi` : `${km.toFixed(0)} km`;
}

export function distanceUnit(units = currentUnits()) {
  return units === "imperial" ? "mi" : "km";
}

export function toDisplayDistance(km, units = currentUnits()) {
  return units === "imperial" ? km / KM_PER_MILE : km;
}

export function formatMass(kg, units = currentUnits()) {
  if (!Number.isFinite(kg)) return "–";
  return units === "imperial" ? `${(kg / KG_PER_LB).toFixed(1)} lb` : `${kg.toFixed(2)} kg`;
}

/** A load on a support as a person reads it: one decimal under 10, whole kg (or lb) above. */
export function formatLoad(kg, units = currentUnits()) {
  if (!Number.isFinite(kg)) return "–";
  const value = units === "imperial" ? kg / KG_PER_LB : kg;
  const unit = units === "imperial" ? "lb" : "kg";
  return `${value < 10 ? value.toFixed(1) : Math.round(value)} ${unit}`;
}

export function formatMHz(mhz) {
  if (!Number.isFinite(mhz)) return "–";
  return `${+mhz.toFixed(4)} MHz`;
}
