// Mast: the to-scale side view of the hung antenna, rope heights, the centre mast, the rope-height sweep,
// the elevation patterns in both planes and the reach against distance.

import { clear, drawingWidth, fmtTick, h, linePlot, s, ticks } from "./dom.js";
import { pointAlong, supportsById } from "./shapes.js";
import { scheduleHours, skyInput } from "./sky.js";
import { distanceUnit, formatLength, formatMass, toDisplayDistance, toDisplayLength, lengthUnit } from "./units.js";
import { chosen, modelSpec } from "./wire.js";
import { stakeRows } from "./card.js";
import { groundWord, kindWord, modeWord } from "./words.js";

const PERSON_M = 1.8; // the height the exposure limits are evaluated at (ARCHITECTURE.md, safety block)
const PATTERN_STEP_DEG = 3;

export function render(app, panel) {
  const st = app.state;
  clear(panel);
  panel.append(h("h2", { text: "Mast — how it hangs" }));
  const o = chosen(app);
  if (!o) {
    panel.append(h("p", { class: "note warn", text: st.planError || "No plan yet: add the supports in Site." }));
    return;
  }
  panel.append(h("div", { class: "card" }, [h("h3", { text: "Side view, to scale" }), sideView(st.dep, o, st.units), sideLegend()]));
  panel.append(ropeTable(st.dep, o, st.units));
  panel.append(mastBlock(o, st.units));
  panel.append(sweepPlot(o, st.units));
  const pat = h("div", { class: "card", "data-patterns": "1" }, [h("h3", { text: "Elevation pattern" }), h("p", { class: "note", text: "Modelling…" })]);
  panel.append(pat);
  const reach = h("div", { class: "card", "data-reach": "1" }, [h("h3", { text: "Reach against distance" }), h("p", { class: "note", text: "Waiting for the sky estimate…" })]);
  panel.append(reach);
  drawPatterns(app, o, pat);
  drawReach(app, o, reach);
}

export function refresh(app, panel) {
  render(app, panel);
}

/** Horizontal axis of the side view: from the first wire end towards the last. */
function spanAxis(wire) {
  const a = wire[0];
  const b = wire.at(-1);
  const len = Math.hypot(b[0] - a[0], b[1] - a[1]) || 1;
  const u = [(b[0] - a[0]) / len, (b[1] - a[1]) / len];
  return { along: (p) => (p[0] - a[0]) * u[0] + (p[1] - a[1]) * u[1], len, u };
}

export function sideView(dep, o, units) {
  const wire = o.hung_wire_m;
  const ax = spanAxis(wire);
  const byId = supportsById(dep);
  const used = (o.supports_used ?? []).map((id) => ({ id, sp: byId.get(id), rope: o.rope_heights_m?.[id] }));
  const feed = pointAlong(wire, o.feed_distance_m);
  const feedS = ax.along(feed);
  const ends = [wire[0], wire.at(-1)];
  // Supports with a position sit where they are; a mast without one holds the feedpoint.
  const placed = used.map((u) => {
    if (u.sp && Number.isFinite(u.sp.x_m) && Number.isFinite(u.sp.y_m)) return { ...u, sAt: ax.along([u.sp.x_m, u.sp.y_m]), top: u.sp.height_m };
    return { ...u, sAt: feedS, top: o.mast?.height_m ?? feed[2], centre: true };
  });
  const keep = o.safety?.keep_out_m ?? 0;
  const outline = o.safety?.keep_out_outline_m ?? [];
  let kLo = null;
  let kHi = null;
  if (outline.length >= 3) {
    const ss = outline.map((p) => ax.along(p));
    kLo = Math.min(...ss);
    kHi = Math.max(...ss);
  } else if (keep > 0) {
    const ss = wire.map((p) => ax.along(p));
    kLo = Math.min(...ss) - keep;
    kHi = Math.max(...ss) + keep;
  }
  const personS = Math.max(...wire.map((p) => ax.along(p)), ...placed.map((p) => p.sAt), kHi ?? -Infinity) + 3;
  const sMin = Math.min(0, ...placed.map((p) => p.sAt), kLo ?? 0) - 3;
  const sMax = personS + 2;
  const zMax = Math.max(...placed.map((p) => p.top ?? 0), ...wire.map((p) => p[2]), PERSON_M) * 1.12 + 1;
  const W = drawingWidth();
  const m = { l: 38, r: 8, t: 10, b: 34 };
  const scale = (W - m.l - m.r) / (sMax - sMin);
  const H = m.t + m.b + zMax * scale;
  const X = (v) => m.l + (v - sMin) * scale;
  const Z = (z) => m.t + (zMax - z) * scale;
  const svg = s("svg", { viewBox: `0 0 ${W} ${H.toFixed(0)}`, class: "plot side-view", role: "img", "aria-label": "Side view of the hung antenna, to scale", "data-testid": "side-view" });
  // height axis
  for (const t of ticks(0, toDisplayLength(zMax, units), 4)) {
    const zm = t / toDisplayLength(1, units);
    svg.append(s("line", { x1: m.l, x2: W - m.r, y1: Z(zm), y2: Z(zm), class: "grid" }));
    svg.append(s("text", { x: m.l - 4, y: Z(zm) + 4, class: "tick", "text-anchor": "end", text: fmtTick(t) }));
  }
  svg.append(s("text", { x: 13, y: m.t + (H - m.t - m.b) / 2, class: "axis-label", "text-anchor": "middle", transform: `rotate(-90 13 ${m.t + (H - m.t - m.b) / 2})`, text: `height (${lengthUnit(units)})` }));
  svg.append(s("text", { x: m.l + (W - m.l - m.r) / 2, y: H - 4, class: "axis-label", "text-anchor": "middle", text: `along the span (${lengthUnit(units)}); grid lines are heights` }));
  for (const t of ticks(toDisplayLength(sMin, units), toDisplayLength(sMax, units), 5)) {
    const sm = t / toDisplayLength(1, units);
    svg.append(s("text", { x: X(sm), y: Z(0) + 14, class: "tick", "text-anchor": "middle", text: fmtTick(t) }));
  }
  if (kLo !== null) {
    svg.append(s("rect", { x: X(kLo), y: Z(PERSON_M), width: (kHi - kLo) * scale, height: PERSON_M * scale, class: "keep-out", "data-testid": "side-keep-out" }));
    svg.append(s("text", { x: X((kLo + kHi) / 2), y: Z(PERSON_M) - 3, class: "small-label keep-label", "text-anchor": "middle", text: `keep-out ${formatLength(keep, { units, digits: 1 })} while sending` }));
  }
  svg.append(s("line", { x1: m.l, x2: W - m.r, y1: Z(0), y2: Z(0), class: "ground-line" }));
  for (const p of placed) {
    const x = X(p.sAt);
    if (p.centre || p.sp?.kind === "mast") {
      svg.append(s("line", { x1: x, x2: x, y1: Z(0), y2: Z(p.top), class: "mast-pole" }));
      // guys to both sides at the mast's guy radius
      const r = o.mast?.guy_radius_m;
      if (p.centre && Number.isFinite(r)) for (const sgn of [-1, 1]) svg.append(s("line", { x1: x, y1: Z(p.top), x2: x + sgn * r * scale, y2: Z(0), class: "guy" }));
    } else {
      const top = p.top ?? p.rope ?? 0;
      svg.append(s("line", { x1: x, x2: x, y1: Z(0), y2: Z(top), class: p.sp?.kind === "tree" ? "trunk" : "mast-pole" }));
      if (p.sp?.kind === "tree") svg.append(s("path", { d: `M${x} ${Z(top) - 6}L${x - 9} ${Z(top * 0.55)}L${x + 9} ${Z(top * 0.55)}Z`, class: "crown" }));
    }
    if (Number.isFinite(p.rope) && !p.centre) {
      svg.append(s("circle", { cx: x, cy: Z(p.rope), r: 3, class: "pulley" }));
      const end = ends.reduce((a, b) => (Math.abs(ax.along(b) - p.sAt) < Math.abs(ax.along(a) - p.sAt) ? b : a));
      svg.append(s("line", { x1: x, y1: Z(p.rope), x2: X(ax.along(end)), y2: Z(end[2]), class: "rope" }));
    }
    svg.append(s("text", { x, y: Math.max(12, Z(p.top ?? 0) - 8), class: "support-label", "text-anchor": "middle", text: p.id }));
  }
  svg.append(s("polyline", { points: wire.map((p) => `${X(ax.along(p)).toFixed(1)},${Z(p[2]).toFixed(1)}`).join(" "), class: "wire-line", "data-testid": "side-wire" }));
  for (const e of ends) svg.append(s("rect", { x: X(ax.along(e)) - 2.5, y: Z(e[2]) - 2.5, width: 5, height: 5, class: "insulator" }));
  svg.append(s("line", { x1: X(feedS), y1: Z(feed[2]), x2: X(feedS), y2: Z(0), class: "coax" }));
  svg.append(s("circle", { cx: X(feedS), cy: Z(feed[2]), r: 4, class: "feedpoint" }));
  svg.append(s("text", { x: X(feedS) + 6, y: Z(feed[2]) + 14, class: "small-label", text: `feed ${formatLength(o.feedpoint_height_m, { units, digits: 1 })}` })); // the plan's figure, as in the table
  // a 1.8 m person for scale
  const px = X(personS);
  const u = scale;
  svg.append(s("g", { class: "person", "data-testid": "person" }, [
    s("circle", { cx: px, cy: Z(PERSON_M - 0.12), r: 0.12 * u }),
    s("line", { x1: px, y1: Z(PERSON_M - 0.25), x2: px, y2: Z(0.85) }),
    s("line", { x1: px, y1: Z(0.85), x2: px - 0.2 * u, y2: Z(0) }),
    s("line", { x1: px, y1: Z(0.85), x2: px + 0.2 * u, y2: Z(0) }),
    s("line", { x1: px - 0.3 * u, y1: Z(1.2), x2: px + 0.3 * u, y2: Z(1.3) }),
  ]));
  svg.append(s("text", { x: px, y: Z(PERSON_M) - 4, class: "small-label", "text-anchor": "middle", text: formatLength(PERSON_M, { units, digits: 1 }) }));
  return svg;
}

function sideLegend() {
  return h("p", { class: "legend-line" }, [
    h("span", { class: "key key-wire" }), "wire ", h("span", { class: "key key-rope" }), "rope ", h("span", { class: "key key-coax" }), "coax drop ",
    h("span", { class: "key key-keepout" }), "keep-out at head height",
  ]);
}

function ropeTable(dep, o, units) {
  const byId = supportsById(dep);
  const box = h("div", { class: "card", "data-testid": "rope-heights" });
  box.append(h("h3", { text: "Rope heights" }));
  const dl = h("dl", { class: "big-list" });
  for (const [id, m] of Object.entries(o.rope_heights_m ?? {})) {
    const sp = byId.get(id);
    dl.append(h("dt", { text: `${id}${sp ? ` (${kindWord(sp.kind)}, up to ${formatLength(sp.height_m, { units, digits: 1 })})` : ""}` }), h("dd", { "data-testid": `rope-${id}`, text: formatLength(m, { units, digits: 1 }) }));
  }
  for (const r of stakeRows(o, units)) dl.append(h("dt", { text: r.label }), h("dd", { class: r.cls, text: r.value }));
  dl.append(h("dt", { text: "Feedpoint height" }), h("dd", { text: formatLength(o.feedpoint_height_m, { units, digits: 1 }) }));
  if (Number.isFinite(o.safety?.min_end_height_m)) dl.append(h("dt", { text: "Lowest end height for RF exposure" }), h("dd", { text: formatLength(o.safety.min_end_height_m, { units, digits: 1 }) }));
  box.append(dl);
  return box;
}

function mastBlock(o, units) {
  const box = h("div", { class: "card", "data-testid": "centre-mast" });
  box.append(h("h3", { text: "Centre mast" }));
  const mm = o.mast;
  if (!mm) {
    box.append(h("p", { text: "No centre mast in this option: the wire hangs between the supports." }));
    return box;
  }
  const dl = h("dl", { class: "kv" });
  const add = (k, v) => dl.append(h("dt", { text: k }), h("dd", { text: v }));
  add("Mast", mm.id);
  add("Feedpoint on the mast at", formatLength(mm.height_m, { units, digits: 1 }));
  add("Top load", `${formatMass(mm.top_load_kg, units)} of ${formatMass(mm.rating_kg, units)} rated`);
  add("Guys", `${mm.guys}, staked ${formatLength(mm.guy_radius_m, { units, digits: 1 })} from the foot`);
  const wind = o.rigging?.strength?.guy_wind_m_s;
  if (mm.guy_tension_n) add("Guy tension", `up to ${mm.guy_tension_n.toFixed(0)} N each${Number.isFinite(wind) ? ` in a ${wind} m/s wind` : ""}`);
  if (Number.isFinite(mm.wind_limit_m_s)) add("Wind rating", `${mm.wind_limit_m_s} m/s (the maker's)`);
  box.append(dl, h("p", { class: mm.ok ? "ok" : "warn", text: mm.why }));
  return box;
}

function sweepPlot(o, units) {
  const box = h("div", { class: "card", "data-testid": "sweep" });
  box.append(h("h3", { text: "Rope-height sweep" }));
  const pts = o.height_sweep;
  if (!Array.isArray(pts) || !pts.length) {
    box.append(h("p", { class: "note", text: "The plan carries no height sweep for this option." }));
    return box;
  }
  const toU = (m) => toDisplayLength(m, units);
  const xs = pts.map((p) => toU(p.feedpoint_height_m));
  const nvis = pts.map((p, i) => [xs[i], p.nvis_mean_gain_dbi]);
  const zen = pts.map((p, i) => [xs[i], p.zenith_gain_dbi]);
  const ys = [...nvis, ...zen].map((p) => p[1]).filter(Number.isFinite);
  const lo = Math.floor(Math.min(...ys) - 1);
  const hi = Math.ceil(Math.max(...ys) + 1.5);
  const xLo = Math.min(...xs) - toU(1);
  const xHi = Math.max(...xs) + toU(1);
  const vlines = [];
  if (Number.isFinite(o.feedpoint_height_m)) vlines.push({ x: toU(o.feedpoint_height_m), cls: "chosen", label: `chosen ${formatLength(o.feedpoint_height_m, { units, digits: 1 })}` });
  const limit = Math.max(...pts.map((p) => p.feedpoint_height_m));
  vlines.push({ x: toU(limit), cls: "limit", label: "supports' limit", row: 1 });
  box.append(linePlot({
    title: "NVIS figure of merit against feedpoint height",
    testid: "sweep-plot",
    x: { min: xLo, max: xHi, label: `feedpoint height (${lengthUnit(units)})` },
    y: { min: lo, max: hi, label: "gain (dBi)" },
    series: [{ points: nvis, cls: "series" }, { points: zen, cls: "series2" }],
    points: nvis.map(([x, y]) => ({ x, y, cls: "dot small" })),
    vlines,
    legend: [{ cls: "series", label: "NVIS mean" }, { cls: "series2", label: "zenith" }],
  }));
  box.append(h("p", { class: "hint", text: `Each point is one rope-height setting the supports allow, modelled over the site's ground. NVIS mean: ${o.nvis?.figure ?? "mean gain over the NVIS elevations"}. The chosen height is marked; the supports' limit is the highest setting they allow.` }));
  if (typeof o.height_choice === "string") box.append(h("p", { class: "hint", text: `Why this height: ${o.height_choice}.` }));
  return box;
}

async function drawPatterns(app, o, box) {
  const st = app.state;
  const key = `pat:${st.planFor}:${st.chosen}`;
  const wire = o.hung_wire_m;
  const a = wire[0];
  const b = wire.at(-1);
  const az = (Math.atan2(b[1] - a[1], b[0] - a[0]) * 180) / Math.PI;
  const azimuths = [az + 90, az + 270, az, az + 180].map((v) => +(((v % 360) + 360) % 360).toFixed(2));
  const elevation = [];
  for (let e = 0; e <= 90; e += PATTERN_STEP_DEG) elevation.push(e);
  let res = st.extra[key];
  if (!res) {
    try {
      const out = await app.call(() => app.api.model(modelSpec(o, st.dep, { frequency_mhz: o.frequency_mhz, pattern: { elevation_deg: elevation, azimuth_deg: azimuths } })));
      res = out.results[0];
      st.extra[key] = res;
    } catch (e) {
      clear(box).append(h("h3", { text: "Elevation pattern" }), h("p", { class: "note warn", text: `The pattern needs the service: ${e.message}` }));
      return;
    }
  }
  clear(box).append(h("h3", { text: "Elevation pattern" }), polarPattern(res, elevation), h("p", { class: "legend-line" }, [
    h("span", { class: "key key-series" }), "across the wire (broadside) ", h("span", { class: "key key-series2" }), "along the wire",
  ]), h("p", { class: "hint", text: `Total gain at ${o.frequency_mhz} MHz over ${groundWord(st.dep.site.ground)} ground; outer ring ${res.max_gain_dbi.toFixed(1)} dBi, rings every 10 dB. Zenith ${res.zenith_gain_dbi.toFixed(1)} dBi.` }));
}

/** A half-circle elevation plot: horizon left and right, zenith up; two planes. */
function polarPattern(res, elevation) {
  const W = 360;
  const H = 210;
  const cx = W / 2;
  const cy = 185;
  const R = 160;
  const RANGE_DB = 30;
  const gmax = res.max_gain_dbi;
  const r = (g) => (Math.max(0, g - gmax + RANGE_DB) / RANGE_DB) * R;
  const svg = s("svg", { viewBox: `0 0 ${W} ${H}`, class: "plot polar", role: "img", "aria-label": "Elevation pattern in two planes", "data-testid": "pattern-plot" });
  const rings = []; // ring labels go on top of the curves (drawn last)
  for (let dB = 0; dB < RANGE_DB; dB += 10) {
    const rr = r(gmax - dB);
    svg.append(s("path", { d: `M${cx - rr} ${cy}A${rr} ${rr} 0 0 1 ${cx + rr} ${cy}`, class: "grid" }));
    rings.push(s("text", { x: cx + 3, y: cy - rr + 12, class: "tick", text: dB === 0 ? `${gmax.toFixed(1)} dBi` : `−${dB} dB` }));
  }
  for (const e of [0, 30, 60, 90, 120, 150, 180]) {
    const t = (e * Math.PI) / 180;
    svg.append(s("line", { x1: cx, y1: cy, x2: cx + R * Math.cos(t), y2: cy - R * Math.sin(t), class: "grid" }));
    const lab = e <= 90 ? e : 180 - e;
    svg.append(s("text", { x: cx + (R + 10) * Math.cos(t), y: cy - (R + 6) * Math.sin(t) + 4, class: "tick", "text-anchor": "middle", text: `${lab}°` }));
  }
  const curve = (iRight, iLeft, cls) => {
    const g = res.gain_dbi;
    const pts = [];
    elevation.forEach((e, j) => pts.push([e, g[iRight][j]]));
    for (let j = elevation.length - 1; j >= 0; j--) pts.push([180 - elevation[j], g[iLeft][j]]);
    const d = pts.map(([ang, gain]) => {
      const t = (ang * Math.PI) / 180;
      return `${(cx + r(gain) * Math.cos(t)).toFixed(1)},${(cy - r(gain) * Math.sin(t)).toFixed(1)}`;
    });
    svg.append(s("polyline", { points: d.join(" "), class: cls }));
  };
  curve(0, 1, "series");
  curve(2, 3, "series2");
  svg.append(...rings);
  svg.append(s("text", { x: 6, y: cy + 18, class: "tick", text: "horizon" }));
  svg.append(s("text", { x: W - 6, y: cy + 18, class: "tick", "text-anchor": "end", text: "horizon" }));
  return svg;
}

async function drawReach(app, o, box) {
  const st = app.state;
  const key = `reach:${st.planFor}:${st.chosen}`;
  let sky = st.extra[key];
  if (!sky) {
    // The sky estimate for this channel with the planned antenna as it hangs (not the default dipole).
    const spec = modelSpec(o, st.dep);
    const input = { ...skyInput(st.dep), channels_mhz: [o.frequency_mhz], antenna: { ground: spec.ground, wires: spec.wires, feed: spec.feed } };
    try {
      sky = await app.call(() => app.api.sky(input));
      st.extra[key] = sky;
    } catch (e) {
      clear(box).append(h("h3", { text: "Reach against distance" }), h("p", { class: "note warn", text: `The reach needs the service: ${e.message}` }));
      return;
    }
  }
  const ch = sky.channels[0];
  const hours = scheduleHours(st.dep);
  const dists = sky.distances_km ?? [];
  const series = [];
  const classes = ["series", "series2", "series3", "series4", "series5"];
  const legend = [];
  const show = [hours[0], hours[Math.floor(hours.length / 2)], hours.at(-1)].filter((v, i, a) => a.indexOf(v) === i);
  show.forEach((hr, i) => {
    const row = ch.by_hour.find((r) => r.hour_utc === hr);
    if (!row?.snr_db) return;
    series.push({ points: dists.map((d, k) => [toDisplayDistance(d, st.units), row.snr_db[k]]), cls: classes[i] });
    legend.push({ cls: classes[i], label: `${String(hr).padStart(2, "0")}:00` });
  });
  const ys = series.flatMap((se) => se.points.map((p) => p[1])).filter(Number.isFinite);
  const need = sky.radio?.required_snr_db;
  const lo = Math.floor(Math.min(...ys, need ?? 0, 0) / 10) * 10;
  const hi = Math.ceil(Math.max(...ys, (need ?? 0) + 10) / 10) * 10;
  const plot = linePlot({
    title: `${ch.frequency_mhz} MHz, signal-to-noise at the far end`,
    testid: "reach-plot",
    x: { min: 0, max: toDisplayDistance(Math.max(...dists, 300), st.units), label: `distance (${distanceUnit(st.units)})` },
    y: { min: lo, max: hi, label: "SNR (dB)" },
    series,
    hlines: Number.isFinite(need) ? [{ y: need, cls: "limit", label: `needed for ${modeWord(sky.radio.mode)}` }] : [],
    legend,
  });
  clear(box).append(h("h3", { text: "Reach against distance" }), plot, h("p", { class: "hint", text: `Sky estimate for ${sky.date}, the planned wire as it hangs, ${sky.radio?.power_w ?? ""} W ${modeWord(sky.radio?.mode)}. Above the line the link works.` }));
}
