// Card: the field card for the person at the tree — what to cut and mark, rope heights per support,
// stake positions of an inverted-V, the trim steps, keep-out distances, the open required checks and the
// cautions — big enough for a phone held in a glove, and one printed A4 or Letter page (css/print.css).
// Every length to cut or mark is the string the plan's cut instruction carries (never recomputed here).

import { clear, h } from "./dom.js";
import { qrSvg } from "./qr.js";
import { readiness } from "./checks.js";
import { cutInstruction, supportsById } from "./shapes.js";
import { formatLength, formatLoad, formatMHz, formatTape, pick } from "./units.js";
import { electricalLegs, linkWords, markWords, pieceWords } from "./wire.js";
import { count, formWord, kindWord, limitSetWord, modeWord } from "./words.js";

const COMPASS = ["N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE", "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW"];

/** "112° (ESE)": a compass bearing a person walks. */
export function bearingWords(deg) {
  const b = ((deg % 360) + 360) % 360;
  return `${Math.round(b) % 360}° (${COMPASS[Math.round(b / 22.5) % 16]})`;
}

/**
 * The stake positions of an inverted-V, as rows {label, value}: from `rigging.stakes_m` (bearing and
 * distance from the mast, per end) when the plan gives them, else the one distance of `rigging`.
 */
export function stakeRows(o, units) {
  const rig = o.rigging ?? {};
  const from = o.mast?.id ?? o.supports_used?.[0] ?? "the centre";
  if (Array.isArray(rig.stakes_m) && rig.stakes_m.length) {
    return rig.stakes_m.map((sk, i) => ({ label: `stake ${i + 1}, from ${from}`, value: `${formatLength(sk.distance_m, { units, digits: 1 })} at ${bearingWords(sk.bearing_deg)}`, testid: `card-stake-${i}`, cls: "small-value" }));
  }
  if (o.form === "inverted-v" && Number.isFinite(rig.stake_distance_m)) {
    return [{ label: `end stakes, from ${from}, in line with the wire`, value: formatLength(rig.stake_distance_m, { units, digits: 1 }), testid: "card-stake-0", cls: "small-value" }];
  }
  return [];
}

/** The essentials as plain text: a phone camera shows it with no network at all (short: a QR code
 * holds about 400 bytes at the error level the encoder uses). */
export function cardText(dep, o, units) {
  const f = (m) => formatLength(m, { units, digits: 1 });
  const ins = cutInstruction(o);
  const lines = [`fieldkit card: ${dep.name}`, `${channelWords(o)} ${formWord(o.form)}, ${o.supports_used.join("-")}`];
  for (const p of ins?.pieces ?? []) {
    const marks = p.marks.map((mk) => `${pick(mk.from_feedpoint_end, units)}${mk.kind === "spare" ? " spare" : ""}`).join(", ");
    lines.push(`Cut ${p.count}x ${pick(p.cut, units)}, marks ${marks}`);
  }
  lines.push(`Ropes ${Object.entries(o.rope_heights_m).map(([id, m]) => `${id} ${f(m)}`).join(", ")}; feed ${f(o.feedpoint_height_m)}`);
  for (const r of stakeRows(o, units)) lines.push(`${r.label}: ${r.value}`);
  const keep = (o.safety?.keep_out_m ?? 0) > 0 ? f(o.safety.keep_out_m) : "none";
  lines.push(`Keep-out ${keep}${Number.isFinite(o.safety?.min_end_height_m) ? `; ends at least ${f(o.safety.min_end_height_m)}` : ""}`);
  return lines.join("\n").replaceAll("\u00a0", " "); // plain spaces: fewer bytes in the code
}

/** "3.605 MHz", or a linked dipole's channels "3.605 / 7.055 MHz". */
function channelWords(o) {
  const list = o.form === "linked" && Array.isArray(o.channels_mhz) ? o.channels_mhz : [o.frequency_mhz];
  return `${list.map((c) => formatMHz(c).replace(" MHz", "")).join(" / ")} MHz`;
}

/** The QR code of the card text; a text too long for the encoder's largest symbol says so instead. */
function cardQr(text) {
  try {
    return [qrSvg(text, { label: "QR code of the field card", testid: "card-qr" }), h("p", { class: "fc-note", text: "Scan: the card as text, no network needed." })];
  } catch {
    return [h("p", { class: "fc-note", "data-testid": "card-qr", text: "This card is too long for a QR code: print it or use the app." })];
  }
}

/** Per hazard, the clearance with the least margin (the one that decides). */
function tightestClearances(o) {
  const by = new Map();
  for (const c of o.safety?.clearances ?? []) {
    const held = by.get(c.hazard);
    if (!held || c.distance_m - c.required_m < held.distance_m - held.required_m) by.set(c.hazard, c);
  }
  return [...by.values()];
}

function block(cls, title, children) {
  return h("section", { class: `fc-block ${cls}` }, [h("h3", { text: title }), ...children]);
}

function rows(list, cls = "big-list") {
  const dl = h("dl", { class: cls });
  for (const r of list) dl.append(h("dt", { text: r.label }, r.sub ? [h("small", { class: "fc-note", text: r.sub })] : []), h("dd", { class: r.cls ?? "", "data-testid": r.testid, text: r.value }));
  return dl;
}

function cutBlock(o, units) {
  const ins = cutInstruction(o);
  if (!ins) return block("fc-cut", "Cut and mark", [h("p", { class: "warn", text: "This plan has no cut instruction yet: press Save and plan in Site." })]);
  const parts = [];
  ins.pieces.forEach((piece, k) => {
    parts.push(h("p", { class: "fc-cut-line" }, [
      h("span", { class: "fc-cut-what", text: `Cut ${pieceWords(piece)}, each` }),
      h("span", { class: "fc-cut-length", "data-testid": k === 0 ? "card-cut-length" : `card-cut-length-${k}`, text: pick(piece.cut, units) }),
    ]));
    const ol = h("ol", { class: "fc-marks" });
    for (const mk of piece.marks) ol.append(h("li", {}, [h("b", { text: pick(mk.from_feedpoint_end, units) }), ` ${markWords(mk, piece, units)}`]));
    parts.push(h("p", { class: "fc-label", text: `Marks, measured from ${piece.marks[0].kind === "feedpoint" ? "the feedpoint end" : "the end nearer the feedpoint"} of each piece:` }), ol);
  });
  const links = linkWords(o);
  if (links) parts.push(h("p", { class: "fc-links", "data-testid": "card-links", text: links }));
  const legs = [...new Set(electricalLegs(o, units))].join(" / ");
  const choke = o.cut?.choke_advice ? " Choke (current balun) at the feedpoint: true SWR readings, no RF back at the radio." : "";
  parts.push(h("p", { class: "fc-note", "data-testid": "card-spool" }, [`Wire off the spool ${pick(ins.total, units)}. Between the feedpoint fold and the end insulator: ${legs} (the model's electrical leg). Wrap ${pick(ins.pieces[0].wrap_each_end, units)} at each end.${choke}`]));
  return block("fc-cut", "Cut and mark", parts);
}

function ropeBlock(dep, o, units) {
  const byId = supportsById(dep);
  const list = Object.entries(o.rope_heights_m).map(([id, m]) => {
    const sp = byId.get(id);
    return { label: `${id} · ${kindWord(sp?.kind)}`, sub: sp?.note, value: formatLength(m, { units, digits: 1 }), testid: `card-rope-${id}` };
  });
  list.push({ label: "feedpoint hangs at about", value: formatLength(o.feedpoint_height_m, { units, digits: 1 }) });
  list.push(...stakeRows(o, units));
  return block("fc-ropes", "Rope heights", [rows(list)]);
}

/** One line under the rope heights: what each support carries (the plan's rigging.loads and rigging.strength), still and in
 * the wind the plan checked, the pull against what the wire may carry, and the guys. */
export function loadLine(o, units) {
  const each = Object.entries(o.rigging?.loads ?? {});
  const S = o.rigging?.strength;
  if (!each.length || !S) return "";
  const still = each.map(([id, sp]) => `${id} ${formatLoad(sp.load_kg, units)}`).join(", ");
  const wind = each.map(([, sp]) => formatLoad(sp.in_wind_kg, units)).join(" and ");
  const guys = o.rigging?.guy_tension_n ?? [];
  const guyText = guys.length ? `; guys up to ${Math.round(Math.max(...guys))} N each at ${S.guy_wind_m_s} m/s` : "";
  return `${still} carried; ${wind} in a ${S.wind_m_s} m/s wind. Pull ${Math.round(S.wire_tension_n)} N of the ${S.wire_working_n} N the wire may carry${guyText}.`;
}

/** The loads under the trim table (the column with room to spare), or a block of their own. */
function loadsNote(o, units) {
  const text = loadLine(o, units);
  return text ? h("p", { class: "fc-note fc-loads", "data-testid": "card-loads" }, [h("b", { text: "Loads: " }), text]) : null;
}

function trimBlock(o, units) {
  const steps = o.cut?.trim_steps ?? [];
  if (!steps.length) {
    const loads = loadsNote(o, units);
    return loads ? block("fc-trim-block", "Loads", [loads]) : null;
  }
  const t = h("table", { class: "fc-trim" });
  t.append(h("thead", {}, [h("tr", {}, [h("th", { text: "dip off by" }), h("th", { text: "below: shorten each leg" }), h("th", { text: "above: lengthen each leg" })])]));
  const tb = h("tbody");
  for (const r of steps) tb.append(h("tr", {}, [h("td", { text: `${r.shift_khz} kHz` }), h("td", { text: formatTape(r.cut_cm_per_leg_to_raise / 100, units) }), h("td", { text: formatTape(r.add_cm_per_leg_to_lower / 100, units) })]));
  t.append(tb);
  return block("fc-trim-block", "After the SWR check", [t, h("p", { class: "fc-note", text: "Shorten: move the end insulator toward the feedpoint. Lengthen: let out spare. Both legs alike." }), loadsNote(o, units)]);
}

function safeBlock(dep, o, units) {
  const f = (m, d = 1) => formatLength(m, { units, digits: d });
  const s = o.safety ?? {};
  const zone = (s.keep_out_m ?? 0) > 0;
  const list = [{ label: zone ? "keep-out while sending, from the wire" : "keep-out while sending", value: zone ? f(s.keep_out_m) : "none", testid: "card-keep-out" }];
  // the zones as the checklist marks them: a distance around each end (and the feedpoint)
  (s.exposure?.keep_out_by_end ?? []).filter((e) => e.keep_out_m > 0).forEach((e, i) => list.push({ label: `around the ${e.name}`, value: f(e.keep_out_m), testid: `card-keep-out-end-${i}` }));
  if (Number.isFinite(s.min_end_height_m)) list.push({ label: "lowest end height for RF exposure", value: f(s.min_end_height_m) });
  const parts = [rows(list), h("p", { class: "fc-note", text: `At ${dep.radio?.power_w ?? ""} W ${modeWord(dep.radio?.mode)}, under the ${limitSetWord(s)}.` })];
  const lines = h("ul", { class: "fc-lines" });
  for (const c of tightestClearances(o)) {
    lines.append(h("li", { class: c.ok ? "" : "warn", "data-testid": `card-clearance-${c.hazard}` }, [
      h("b", { text: `${c.hazard_name ?? "power line"}: ` }),
      `${c.object} ${f(c.distance_m, 0)} from it, needs ${f(c.required_m, 0)} — `,
      h("b", { text: c.ok ? "clear" : "TOO CLOSE" }),
    ]));
  }
  if (lines.childElementCount) parts.push(lines);
  return block("fc-safe", "Keep clear", parts);
}

function checksBlock(app, o) {
  const st = app.state;
  const r = readiness(app);
  const required = st.checks.filter((c) => c.stage === "pre-raise" && c.required).length;
  const title = r.ready ? "Ready to raise" : `Open required checks (${r.open.length})`;
  const parts = [];
  if (r.raiseOk === false) parts.push(h("p", { class: "warn big-warn", text: "Do not raise: a clearance fails." }));
  if (r.ready) parts.push(h("p", { text: `All ${count(required, "required pre-raise check")} ticked${r.pending.length ? " (some still to reach the service)" : ""}.` }));
  const titles = new Map((o.safety?.checklist ?? []).map((c) => [c.id, c.title]));
  const ul = h("ul", { class: "fc-open", "data-testid": "card-open-checks" });
  for (const c of r.open) ul.append(h("li", { text: titles.get(c.id) || c.title }));
  parts.push(ul);
  return block("fc-checks", title, parts);
}

export function render(app, panel) {
  const st = app.state;
  const units = st.units;
  clear(panel);
  const o = st.plan?.options?.[0];
  if (!o) {
    panel.append(h("h2", { text: "Field card" }), h("p", { class: "note warn", text: st.planError || "No plan yet: add the supports in Site." }));
    return;
  }
  const cardEl = h("article", { class: "field-card", "data-testid": "field-card" });
  const schedule = st.dep.schedule ? ` · schedule ${st.dep.schedule.start_utc}–${st.dep.schedule.end_utc} UTC` : "";
  cardEl.append(h("header", { class: "fc-head" }, [
    h("h2", { text: st.dep.name }),
    h("p", { class: "fc-sub", text: `${channelWords(o)} · ${formWord(o.form)} dipole · ${o.supports_used.join(" to ")}${schedule}` }),
  ]));
  const qr = h("section", { class: "fc-block fc-qr" }, cardQr(cardText(st.dep, o, units)));
  const cautions = (o.safety?.cautions ?? []).slice(0, 5);
  cardEl.append(h("div", { class: "fc-grid" }, [
    cutBlock(o, units),
    ropeBlock(st.dep, o, units),
    trimBlock(o, units),
    safeBlock(st.dep, o, units),
    checksBlock(app, o),
    cautions.length ? block("fc-cautions", "Cautions", [h("ul", {}, cautions.map((c) => h("li", { text: c })))]) : null,
    qr,
  ]));
  cardEl.append(h("p", { class: "fc-foot", text: `Printed ${new Date().toISOString().slice(0, 16).replace("T", " ")} UTC. Estimates from fieldkit. Follow local codes, licence conditions and your team's practice.` }));
  panel.append(cardEl);
  const actions = h("div", { class: "row no-print" }, [
    h("button", { type: "button", class: "primary", "data-testid": "print", text: "Print the card", on: { click: () => window.print() } }),
    h("button", { type: "button", "data-testid": "lan-show", text: "Phones: show the LAN code", on: { click: () => showLan(app, lanBox) } }),
  ]);
  const lanBox = h("div", { class: "card no-print", "data-testid": "lan", hidden: true });
  panel.append(actions, lanBox);
}

async function showLan(app, box) {
  box.hidden = false;
  clear(box).append(h("p", { class: "note", text: "Asking the service…" }));
  try {
    const lan = await app.call(() => app.api.lan());
    clear(box).append(
      h("h3", { text: lan.lan ? "Phones on the laptop's network" : "This service is for this computer only" }),
      lan.lan ? qrSvg(lan.url, { label: "QR code of the app's address on the local network", testid: "lan-qr" }) : null,
      h("p", { class: "mono", "data-testid": "lan-url", text: lan.url }),
      h("p", { class: "hint", text: lan.lan ? "Phones on the same Wi-Fi: scan the code with the camera. The address carries the access key — show it only to your team." : "Start fieldkit with --lan to let phones on the hotspot join." }),
    );
  } catch (e) {
    clear(box).append(h("p", { class: "note warn", text: `No LAN address: ${e.message}` }));
  }
}
