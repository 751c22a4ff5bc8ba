// Analyser file: pick a measured sweep (Touchstone .s1p or CSV) on the laptop or the phone, say where it
// was taken, and let the service work it out (POST /api/plan with retrim.sweep): the resonance and the
// lowest SWR at the feedpoint, the model's correction factor, the re-trim per leg, the ground class the
// measurement fits and the offer to keep it for the next plan at this site. The measured curve is kept in
// app.state.extra.sweep and drawn over the model's SWR curve by wire.js.

import { ApiError } from "./api.js";
import { clear, h } from "./dom.js";
import { planInput } from "./shapes.js";
import { formatMHz, formatTape } from "./units.js";
import { groundWord } from "./words.js";

export const MAX_FILE_BYTES = 256 * 1024; // the service reads at most this much (fieldkit.rigging.analyser)
const FORMATS = { s1p: "touchstone", csv: "csv", txt: "csv" };

/** The sweep's format from the file name, or null. */
export function sweepFormat(name) {
  const ext = String(name).toLowerCase().split(".").pop();
  return FORMATS[ext] ?? null;
}

/** The measured curve as [frequency MHz, SWR] pairs for the plot, for this option only. */
export function measuredPoints(app, o) {
  const sw = app.state.extra.sweep;
  if (!sw || sw.key !== optionKey(app, o)) return null;
  return sw.block.sweep.curve.map((p) => [p.frequency_mhz, Math.min(p.swr, 10)]);
}

function optionKey(app, o) {
  return `${app.state.planFor}:${o.form}:${o.frequency_mhz}`;
}

/** The plan input with the file as the re-trim of this option's channel and form. */
export function sweepInput(dep, o, { at, format, text, name }) {
  const input = planInput(dep);
  input.retrim = { frequency_mhz: o.frequency_mhz, form: o.form, at, sweep: { format, text, name } };
  return input;
}

function adviceWords(r, units) {
  const cm = r.change_cm_per_leg;
  const amount = formatTape(Math.abs(cm) / 100, units);
  if (Math.abs(cm) < 0.5) return "The measured resonance is on the channel: leave the wire as it is.";
  if (cm < 0) return `Cut ${amount} off each leg (the antenna resonates below the channel: the wire is too long).`;
  return `Add ${amount} to each leg: let out spare at the end insulators (the antenna resonates above the channel: the wire is too short).`;
}

function findings(app, o, r, box, onCurve) {
  const sw = r.sweep;
  const units = app.state.units;
  const rows = [
    ["Resonance at the feedpoint (X = 0)", sw.resonance_mhz == null ? "not inside the sweep" : formatMHz(sw.resonance_mhz)],
    ["R at resonance", sw.r_at_resonance_ohm == null ? "–" : `${sw.r_at_resonance_ohm.toFixed(1)} Ω`],
    ["Lowest SWR", `${sw.lowest_swr.toFixed(2)} at ${formatMHz(sw.lowest_swr_mhz)}`],
    ["Model's correction factor (measured ÷ model resonance)", r.correction_factor.toFixed(4)],
  ];
  const dl = h("dl", { class: "facts", "data-testid": "sweep-facts" });
  for (const [k, v] of rows) dl.append(h("dt", { text: k }), h("dd", { text: v }));
  clear(box).append(
    h("p", { class: "result big-result", "data-testid": "sweep-result", text: adviceWords(r, units) }),
    dl,
    h("p", { class: "hint", text: `${sw.points} points from ${sw.name ?? "the file"}; ${sw.note}.` }),
  );
  if (r.ground_fit) box.append(groundFit(app, r.ground_fit));
  onCurve();
}

function groundFit(app, fit) {
  const words = `${fit.words.charAt(0).toUpperCase()}${fit.words.slice(1)}.`;
  const box = h("div", { class: "ground-fit", "data-testid": "ground-fit" }, [h("p", { text: words })]);
  if (fit.keep) {
    const ground = fit.keep.site.ground;
    const keep = h("button", { type: "button", "data-testid": "keep-ground", text: `Keep ${groundWord(ground)} ground for this site` });
    keep.addEventListener("click", () => {
      app.change((dep) => {
        dep.site.ground = ground;
      });
      keep.replaceWith(h("p", { class: "note", "data-testid": "ground-kept", text: `Kept: the next plan at this site uses ${groundWord(ground)} ground (Save and plan in Site plans with it now).` }));
    });
    box.append(keep);
  }
  return box;
}

/** The analyser-file card of the re-trim; ``onCurve`` redraws the SWR plot with the measured curve. */
export function sweepCard(app, o, onCurve) {
  const st = app.state;
  const card = h("div", { class: "card", "data-testid": "sweep-card" });
  card.append(h("h3", { text: "Analyser file" }));
  card.append(h("p", { class: "hint", text: "A sweep saved by the analyser: Touchstone (.s1p), or CSV whose header line reads Frequency (MHz), R (Ω), X (Ω) — or Frequency (MHz), SWR. fieldkit finds the resonance at the feedpoint and says what to trim." }));
  const at = h("select", { "data-testid": "sweep-at", "data-field": "retrim.at" }, [
    h("option", { value: "feedpoint", text: "at the feedpoint" }),
    h("option", { value: "radio", text: "at the radio end of the coax" }),
  ]);
  const file = h("input", { type: "file", accept: ".s1p,.csv,.txt,text/csv,text/plain", "data-testid": "sweep-file", "data-field": "retrim.sweep.text" });
  const out = h("div", { "data-testid": "sweep-out" });
  const work = async () => {
    const f = file.files?.[0];
    if (!f) return;
    const format = sweepFormat(f.name);
    if (!format) return void clear(out).append(h("p", { class: "note warn", text: `${f.name}: expected a .s1p or .csv file.` }));
    if (f.size > MAX_FILE_BYTES) return void clear(out).append(h("p", { class: "note warn", text: `${f.name} is ${Math.round(f.size / 1024)} KiB; at most 256 KiB are read: export a narrower sweep around the channel.` }));
    clear(out).append(h("p", { class: "note", text: "Working out the sweep…" }));
    try {
      const text = await f.text();
      const plan = await app.call(() => app.api.plan(sweepInput(st.dep, o, { at: at.value, format, text, name: f.name })));
      const match = plan.options.find((p) => p.form === o.form && p.frequency_mhz === o.frequency_mhz && p.retrim) ?? plan.options.find((p) => p.retrim);
      if (!match) return void clear(out).append(h("p", { class: "note warn", text: "The plan has no option on this channel and form to re-trim." }));
      st.extra.sweep = { key: optionKey(app, o), block: match.retrim };
      findings(app, o, match.retrim, out, onCurve);
    } catch (e) {
      clear(out).append(h("p", { class: "note warn", "data-testid": "sweep-error", text: e instanceof ApiError ? `The file was refused: ${e.detail}` : e.message }));
    }
  };
  file.addEventListener("change", work);
  at.addEventListener("change", work);
  card.append(
    h("label", { class: "field" }, [h("span", { text: "Measured " }), at]),
    h("label", { class: "field" }, [h("span", { text: "Sweep file " }), file]),
    out,
  );
  const kept = st.extra.sweep;
  if (kept && kept.key === optionKey(app, o)) findings(app, o, kept.block, out, () => {});
  return card;
}
