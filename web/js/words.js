// The words the app shows for the contract's codes: the JSON says "inverted-v", "very-poor", "rg-58";
// a person reads "inverted-V", "very poor", "RG-58 class". One place, so no code reaches the screen.

export const SUPPORT_KINDS = [["tree", "tree"], ["mast", "mast"], ["pole", "pole"], ["building", "building corner"], ["vehicle", "vehicle mast"]];
export const GROUNDS = [
  ["poor", "poor (rocky)"], ["average", "average (clay)"], ["very-good", "very good (rich soil)"], ["very-poor", "very poor (city)"],
  ["medium-dry", "medium dry"], ["very-dry", "very dry"], ["wet", "wet"], ["fresh-water", "fresh water"], ["sea-water", "sea water"],
];
export const FORMS = [["auto", "best of all"], ["flat", "flat"], ["inverted-v", "inverted-V"], ["sloping", "sloping"], ["linked", "linked"]];
export const CONDUCTORS = [["copper", "copper"], ["aluminium", "aluminium"], ["copper-clad-steel", "copper-clad steel"], ["steel", "steel"]];
export const COAX = [["rg-58", "RG-58 class (thin)"], ["rg-8x", "RG-8X class"], ["rg-213", "RG-213 class (thick)"], ["lmr-400", "LMR-400 class"]];
const MODES = { ssb: "SSB", cw: "CW", am: "AM", fm: "FM", data: "data" };

const lookup = (pairs) => Object.fromEntries(pairs);
const FORM_WORDS = { ...lookup(FORMS), "inverted-v": "inverted-V" };
const GROUND_WORDS = { ...lookup(GROUNDS.map(([k, v]) => [k, v.replace(/ \(.*\)$/, "")])), perfect: "perfect", "free-space": "free space" };
const CONDUCTOR_WORDS = lookup(CONDUCTORS);
const COAX_WORDS = lookup(COAX.map(([k, v]) => [k, v.replace(/ \(.*\)$/, "")]));
const KIND_WORDS = lookup(SUPPORT_KINDS);

/** "inverted-V", "sloping" … (an unknown code is shown with its hyphens as spaces, never raw). */
export const formWord = (code) => FORM_WORDS[code] ?? String(code ?? "").replaceAll("-", " ");
/** "poor", "very poor", or "the site's" for explicit ground constants. */
export const groundWord = (ground) => (typeof ground === "string" ? GROUND_WORDS[ground] ?? ground.replaceAll("-", " ") : "the site's");
export const conductorWord = (code) => CONDUCTOR_WORDS[code] ?? String(code ?? "").replaceAll("-", " ");
export const coaxWord = (code) => COAX_WORDS[code] ?? String(code ?? "coax").toUpperCase();
export const modeWord = (code) => MODES[code] ?? String(code ?? "");
export const kindWord = (code) => KIND_WORDS[code] ?? String(code ?? "support");
/** The limit set in words, as the service names it (`safety.limit_set_name`). */
export const limitSetWord = (safety) => safety?.limit_set_name ?? "";

/**
 * The name of each hazard in every text: the id the operator gave it, else its kind numbered from 1
 * within that kind ("power line 1", "path 1") — the rule of fieldkit.safety.hazards.hazard_names.
 */
export function hazardNames(hazards) {
  const seen = {};
  return (hazards ?? []).map((hz) => {
    seen[hz.kind] = (seen[hz.kind] ?? 0) + 1;
    return hz.id || `${hz.kind === "power_line" ? "power line" : "path"} ${seen[hz.kind]}`;
  });
}

/** "1 check", "3 checks". */
export const count = (n, one, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
