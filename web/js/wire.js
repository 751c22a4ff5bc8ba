// Wire: the ranked options; for the chosen one the cut instruction in big type (one length to cut per
// piece and where to mark it, the strings of the plan's cut instruction), the trim steps, the SWR curve
// from the model of the hung wire, and the re-trim from a measured SWR dip. Cards in that order; a later
// measured curve is drawn in the SWR card ([data-swr]) from the analyser file card (measured.js).

import { noChannelBanner } from "./advice.js";
import { ApiError } from "./api.js";
import { clear, h, linePlot } from "./dom.js";
import { numberField } from "./fields.js";
import { measuredPoints, sweepCard } from "./measured.js";
import { cutInstruction, legLengths } from "./shapes.js";
import { formatMHz, formatTape, pick } from "./units.js";
import { formWord, groundWord } from "./words.js";

const SWEEP_SPAN = 0.05; // ±5 % around the channel: wide enough to show the dip after a poor first cut
const SWEEP_POINTS = 21;
const TRIM_STEPS_KHZ = [10, 25, 50, 100, 200];

/** Model spec of an option's hung wire, as ARCHITECTURE.md's model contract. */
export function modelSpec(option, dep, extra = {}) {
  const w = option.wire;
  const wire = { points_m: option.hung_wire_m, diameter_mm: w.diameter_mm, conductor: w.conductor ?? "copper" };
  if (w.insulation) wire.insulation = { thickness_mm: w.insulation.thickness_mm, relative_permittivity: w.insulation.relative_permittivity };
  return { ground: dep.site.ground ?? "average", wires: [wire], feed: { wire: 0, distance_m: option.feed_distance_m }, power_w: dep.radio?.power_w ?? 100, ...extra };
}

/**
 * Length change per leg for a resonance move from f to f + df: the resonant length of a dipole goes as
 * 1/f to first order (common practice, e.g. the usual "cut long, trim by proportion" rule), so
 * leg' = leg · f / (f + df).
 */
export function trimPerLeg(legM, fMHz, dfMHz) {
  return legM - (legM * fMHz) / (fMHz + dfMHz);
}

export function chosen(app) {
  return app.state.plan?.options?.[app.state.chosen] ?? null;
}

export function render(app, panel) {
  const st = app.state;
  clear(panel);
  panel.append(h("h2", { text: "Wire — what to cut" }));
  const banner = noChannelBanner(st);
  if (banner) panel.append(banner);
  const options = st.plan?.options ?? [];
  if (!options.length) {
    panel.append(h("p", { class: "note warn", text: st.planError || "No plan yet: add the supports in Site." }));
    return;
  }
  const list = h("ol", { class: "options", "data-testid": "options" });
  options.forEach((o, i) => {
    const zenith = o.nvis?.zenith_gain_dbi;
    const b = h("button", { type: "button", class: `option ${i === st.chosen ? "current" : ""}`, "aria-pressed": String(i === st.chosen), "data-testid": `option-${i}` }, [
      h("b", { text: `${i + 1}. ${formWord(o.form)}, ${formatMHz(o.frequency_mhz)}` }),
      h("span", { text: ` ${o.supports_used.join("–")} · SWR ${Number.isFinite(o.swr) ? o.swr.toFixed(2) : "–"} · zenith gain ${Number.isFinite(zenith) ? zenith.toFixed(1) : "–"} dBi` }),
      o.safety && o.safety.raise_ok === false ? h("span", { class: "warn", text: " · not safe to raise" }) : null,
    ]);
    b.addEventListener("click", () => app.choose(i));
    list.append(h("li", {}, [b]));
  });
  panel.append(h("h3", { text: "Options, best first" }), list);
  if (st.chosen !== 0) panel.append(h("p", { class: "note", text: "You are viewing another option than the plan's first choice. The checks and the field card follow the first choice; change the antenna form in Site to make the plan choose this one." }));
  const o = chosen(app);
  for (const w of o.warnings ?? []) panel.append(h("p", { class: "note warn", text: sentence(w) }));
  panel.append(cutCard(o, st.units));
  panel.append(trimTable(o, st.units));
  const swrBox = h("div", { class: "card", "data-swr": "1" });
  panel.append(swrBox);
  panel.append(retrim(app, o));
  panel.append(sweepCard(app, o, () => drawSwr(app, o, swrBox)));
  drawSwr(app, o, swrBox);
}

export function refresh(app, panel) {
  render(app, panel);
}

/** What to do at a mark, in the units shown (the lengths come from the instruction, never recomputed). */
export function markWords(mark, piece, units) {
  if (mark.kind === "feedpoint") return "feedpoint fold: through the centre insulator or balun";
  if (mark.kind === "link") return "link fold: through the link insulator";
  if (mark.kind === "end insulator") return "end insulator: pass through and fold back";
  return `the ${pick(piece.spare, units)} spare starts here: fold it back and tape it; cut it off only after the SWR check`;
}

const LEG_NAMES = ["A", "B"];

/** A message of the service as a sentence: capital first letter, full stop. */
export function sentence(text) {
  const t = String(text).trim();
  return `${t.charAt(0).toUpperCase()}${t.slice(1)}${/[.!?]$/.test(t) ? "" : "."}`;
}

/**
 * Each leg's electrical length, feedpoint fold to end insulator, as the instruction reads it between
 * its marks (one piece per leg); a linked dipole's leg is several pieces: its whole leg as a tape reads it.
 */
export function electricalLegs(o, units) {
  const ins = cutInstruction(o);
  return legLengths(o).map((leg, i) => {
    const own = ins?.pieces.filter((p) => p.legs.includes(LEG_NAMES[i])) ?? [];
    return own.length === 1 ? pick(own[0].electrical, units) : formatTape(leg, units);
  });
}

/** A linked dipole: which links to open for which channel (from the plan's `links`). */
export function linkWords(o) {
  if (o.form !== "linked" || !Array.isArray(o.links) || !o.links.length) return null;
  const low = o.frequency_mhz;
  // the links sit between the sections, innermost first: name them by section, not by a second length
  const byDistance = [...o.links].sort((a, b) => a.link_from_feed_m - b.link_from_feed_m);
  const parts = byDistance.map((lk, k) => `for ${formatMHz(lk.frequency_mhz)} open the links after section ${k + 1} (and close any nearer the feedpoint)`);
  return `Links: for ${formatMHz(low)} close every link; ${parts.join("; ")}.`;
}

/** "2 pieces, legs A and B" / "1 piece, leg A, section 2 of 2". */
export function pieceWords(piece) {
  return `${piece.count} ${piece.count === 1 ? "piece" : "pieces"}, ${piece.name}`;
}

/** The one cut instruction: per piece the length to cut and the marks from the feedpoint end. */
function cutCard(o, units) {
  const box = h("div", { class: "card cut-list", "data-testid": "cut-list" });
  box.append(h("h3", { text: "Cut and mark" }));
  const ins = cutInstruction(o);
  if (!ins) {
    box.append(h("p", { class: "note warn", text: "This plan was made before fieldkit wrote one cut instruction: press Save and plan in Site to get it." }));
  } else {
    ins.pieces.forEach((piece, k) => {
      const block = h("div", { class: "piece", "data-testid": `piece-${k}` });
      block.append(h("p", { class: "cut-line" }, [
        h("span", { class: "cut-what", text: `Cut ${pieceWords(piece)}, each` }),
        h("span", { class: "cut-length", "data-testid": k === 0 ? "cut-length" : `cut-length-${k}`, text: pick(piece.cut, units) }),
      ]));
      block.append(h("p", { class: "label", text: `Mark each piece, measured from ${piece.marks[0].kind === "feedpoint" ? "its feedpoint end" : "its end nearer the feedpoint"}:` }));
      const marks = h("ol", { class: "marks" });
      for (const mk of piece.marks) {
        marks.append(h("li", { "data-kind": mk.kind }, [h("span", { class: "mark-at", text: pick(mk.from_feedpoint_end, units) }), h("span", { class: "mark-what", text: markWords(mk, piece, units) })]));
      }
      block.append(marks);
      box.append(block);
    });
    const links = linkWords(o);
    if (links) box.append(h("p", { class: "note", "data-testid": "links", text: links }));
    box.append(h("p", { class: "spool" }, ["Wire off the spool: ", h("b", { "data-testid": "total-wire", text: pick(ins.total, units) })]));
  }
  // The model's figure stays visible, marked as such: the electrical leg between the marks.
  const model = h("p", { class: "hint model-figures", "data-testid": "model-figures" }, [`The model's electrical leg (feedpoint fold to end insulator: the length that resonates at ${formatMHz(o.frequency_mhz)} as the wire hangs): `]);
  electricalLegs(o, units).forEach((text, i) => model.append(`${i ? ", " : ""}leg ${LEG_NAMES[i]} `, h("span", { "data-testid": `leg-${i}`, text })));
  model.append(". Wrap: ", h("span", { "data-testid": "wrap", text: ins ? pick(ins.pieces[0].wrap_each_end, units) : formatTape(o.cut.wrap_allowance_m, units) }), " at each end of a piece, folded back through the insulator.");
  box.append(model);
  if (o.cut.cut_long_advice) box.append(h("p", { class: "hint", text: `Why the spare: ${o.cut.cut_long_advice}.` }));
  return box;
}

function trimTable(o, units) {
  const legs = legLengths(o);
  const leg = legs.length ? legs.reduce((a, b) => a + b, 0) / legs.length : NaN;
  const box = h("div", { class: "card", "data-testid": "trim-table" });
  box.append(h("h3", { text: "Trim steps" }));
  const t = h("table", { class: "plain" });
  t.append(h("thead", {}, [h("tr", {}, [h("th", { text: "Dip this far off the channel" }), h("th", { text: "Dip below: shorten each leg" }), h("th", { text: "Dip above: lengthen each leg" })])]));
  const tb = h("tbody");
  const given = o.cut?.trim_steps;
  let rows;
  let source;
  if (Array.isArray(given) && given.length) {
    rows = given.map((r) => [r.shift_khz, r.cut_cm_per_leg_to_raise / 100, r.add_cm_per_leg_to_lower / 100]);
    source = `From the model of the hung wire (its resonance moves ${o.cut.sensitivity_khz_per_cm ?? "–"} kHz per cm of each leg).`;
  } else {
    rows = TRIM_STEPS_KHZ.map((k) => [k, trimPerLeg(leg, o.frequency_mhz, k / 1000), -trimPerLeg(leg, o.frequency_mhz, -k / 1000)]);
    source = "From length ∝ 1/frequency (common practice).";
  }
  for (const [khz, cutM, addM] of rows) tb.append(h("tr", {}, [h("td", { text: `${khz} kHz` }), h("td", { text: formatTape(cutM, units) }), h("td", { text: formatTape(addM, units) })]));
  t.append(tb);
  box.append(h("div", { class: "table-wrap" }, [t]), h("p", { class: "hint", text: `${source} Shorten by moving the end-insulator fold toward the feedpoint; lengthen by letting out spare. Trim both legs alike, in small steps, and measure again.` }));
  return box;
}

async function drawSwr(app, o, box) {
  const st = app.state;
  const f0 = o.frequency_mhz;
  const key = `swr:${st.planFor}:${st.chosen}`;
  clear(box).append(h("h3", { text: "SWR across the channel" }), h("p", { class: "note", text: "Modelling the hung wire…" }));
  let results = st.extra[key] ?? o.swr_curve?.points;
  if (!results) {
    const freqs = Array.from({ length: SWEEP_POINTS }, (_, i) => +(f0 * (1 - SWEEP_SPAN + (2 * SWEEP_SPAN * i) / (SWEEP_POINTS - 1))).toFixed(5));
    try {
      const out = await app.call(() => app.api.model(modelSpec(o, st.dep, { frequencies_mhz: freqs })));
      results = out.results;
      st.extra[key] = results;
    } catch (e) {
      clear(box).append(h("h3", { text: "SWR across the channel" }), h("p", { class: "note warn", text: `The SWR curve needs the service: ${e instanceof ApiError ? e.message : e.message}` }));
      return;
    }
  }
  const pts = results.map((r) => [r.frequency_mhz, Math.min(r.swr, 10)]);
  const minPt = pts.reduce((a, b) => (b[1] < a[1] ? b : a));
  const ymax = Math.min(10, Math.max(3, Math.ceil(Math.max(...pts.map((p) => p[1])))));
  const measured = st.extra.dipMHz;
  const sweep = measuredPoints(app, o);
  const xs = [pts[0][0], pts.at(-1)[0], ...(sweep ? [sweep[0][0], sweep.at(-1)[0]] : [])];
  const plot = linePlot({
    title: `SWR (${o.feedline?.reference_impedance_ohm ?? 50} Ω) at the feedpoint`,
    testid: "swr-plot",
    x: { min: Math.min(...xs), max: Math.max(...xs), label: "frequency (MHz)" },
    y: { min: 1, max: ymax, label: "SWR" },
    series: [{ points: pts, cls: "series" }, ...(sweep ? [{ points: sweep, cls: "series2 measured-curve" }] : [])],
    hlines: [{ y: 2, cls: "limit", label: "2:1" }],
    vlines: [{ x: f0, cls: "mark", label: `channel ${f0}` }, ...(Number.isFinite(measured) ? [{ x: measured, cls: "measured", label: `measured ${measured}`, row: 1 }] : [])],
    points: [{ x: minPt[0], y: minPt[1], label: `dip ${minPt[0].toFixed(3)}`, cls: "dot" }],
  });
  const legend = sweep ? " Solid line: the model; dashed line: the analyser file, at the feedpoint." : "";
  clear(box).append(h("h3", { text: "SWR across the channel" }), plot, h("p", { class: "hint", "data-testid": "swr-legend", text: `Model of the wire as it hangs, over ${groundWord(st.dep.site.ground)} ground, without the coax. Dip at ${minPt[0].toFixed(3)} MHz, SWR ${minPt[1].toFixed(2)}.${legend}` }));
}

function retrim(app, o) {
  const st = app.state;
  const legs = legLengths(o);
  const leg = legs.length ? legs.reduce((a, b) => a + b, 0) / legs.length : NaN;
  const box = h("div", { class: "card", "data-testid": "retrim" });
  box.append(h("h3", { text: "Re-trim after raising" }));
  box.append(h("p", { class: "hint", text: "Measure the SWR across the channel with a low-power analyser at the feedpoint or through the coax, and type the frequency of the lowest SWR. Through the coax is fine for the dip: a 50 Ω line leaves the frequency of the lowest SWR where it is (R and X are another matter: for those use an analyser file below)." }));
  const out = h("p", { class: "result big-result", "data-testid": "retrim-result", text: "Type the measured dip: fieldkit says how much to cut off or add to each leg." });
  const show = (dip) => {
    st.extra.dipMHz = dip;
    let change;
    const sensKhzPerCm = o.cut?.sensitivity_khz_per_cm;
    const fModel = o.cut?.model_resonance_mhz;
    if (Number.isFinite(sensKhzPerCm) && sensKhzPerCm > 0 && Number.isFinite(fModel)) {
      // The real wire resonates k = f_dip / f_model times the model; move the model's resonance to
      // target / k along the engine's sensitivity (same rule as fieldkit.rigging.cut.retrim).
      const sensMHzPerM = -sensKhzPerCm * 0.1; // kHz/cm -> MHz/m; longer wire, lower frequency
      const k = dip / fModel;
      change = -((o.frequency_mhz / k - fModel) / sensMHzPerM);
    } else {
      // length ∝ 1/f: new leg = leg · f_dip / f_target (common practice)
      change = leg - (leg * dip) / o.frequency_mhz;
    }
    const spare = cutInstruction(o)?.pieces?.at(-1)?.spare?.m ?? 0;
    const amount = formatTape(Math.abs(change), st.units);
    if (Math.abs(change) < 0.005) out.textContent = "The dip is on the channel: leave the wire as it is.";
    else if (change > 0) out.textContent = `Cut ${amount} off each leg: move each end insulator ${amount} toward the feedpoint and fold the extra back with the spare (the dip is below the channel: the wire is too long).`;
    else if (-change <= spare + 1e-9) out.textContent = `Add ${amount} to each leg: let out that much of the spare at the end insulator (the dip is above the channel: the wire is too short).`;
    else out.textContent = `Add ${amount} to each leg: more than the ${formatTape(spare, st.units)} spare, so splice on wire and measure again (the dip is above the channel: the wire is too short).`;
  };
  box.append(numberField({ label: "Measured dip (MHz)", value: st.extra.dipMHz ?? "", min: o.frequency_mhz * 0.7, max: o.frequency_mhz * 1.3, what: "a frequency in MHz near the channel", testid: "dip", fieldPath: "retrim.dip_mhz", onValid: show }));
  box.append(out);
  if (Number.isFinite(st.extra.dipMHz)) show(st.extra.dipMHz);
  return box;
}
