// The to-scale top-down sketch of the clearing: supports, power lines, the chosen wire and its keep-out zone.

import { drawingWidth, fmtTick, s, ticks } from "./dom.js";
import { formatLength, FOOT_M } from "./units.js";
import { hazardNames } from "./words.js";

function niceBar(spanM, units) {
  const unitM = units === "imperial" ? FOOT_M : 1;
  const target = spanM / unitM / 4;
  const mag = 10 ** Math.floor(Math.log10(target));
  const step = [1, 2, 5, 10].map((m) => m * mag).filter((v) => v <= target).pop() ?? mag;
  return { lengthM: step * unitM, label: `${fmtTick(step)} ${units === "imperial" ? "ft" : "m"}` };
}

/** Clip the segment a–b to the box; null when it misses (Liang–Barsky). */
function clipSegment(a, b, box) {
  let t0 = 0;
  let t1 = 1;
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const edges = [[-dx, a[0] - box.x0], [dx, box.x1 - a[0]], [-dy, a[1] - box.y0], [dy, box.y1 - a[1]]];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return null;
    } else {
      const r = q / p;
      if (p < 0) t0 = Math.max(t0, r);
      else t1 = Math.min(t1, r);
      if (t0 > t1) return null;
    }
  }
  return [[a[0] + t0 * dx, a[1] + t0 * dy], [a[0] + t1 * dx, a[1] + t1 * dy]];
}

/**
 * @param {object} dep deployment (plan input)
 * @param {object|null} option chosen plan option
 * @param {string} units
 */
export function siteSketch(dep, option, units) {
  const supports = (dep.site?.supports ?? []).filter((sp) => Number.isFinite(sp.x_m) && Number.isFinite(sp.y_m));
  const wire = option?.hung_wire_m ?? [];
  const outline = option?.safety?.keep_out_outline_m ?? [];
  const pts = [[0, 0], ...supports.map((sp) => [sp.x_m, sp.y_m]), ...wire.map((p) => [p[0], p[1]]), ...outline];
  let x0 = Math.min(...pts.map((p) => p[0]));
  let x1 = Math.max(...pts.map((p) => p[0]));
  let y0 = Math.min(...pts.map((p) => p[1]));
  let y1 = Math.max(...pts.map((p) => p[1]));
  const names = hazardNames(dep.site?.hazards);
  const hazards = (dep.site?.hazards ?? []).map((hz, i) => ({ ...hz, name: names[i] })).filter((hz) => Array.isArray(hz.points_m) && hz.points_m.length >= 2);
  // Keep a power line in view when it is near (within 60 m of the supports): it matters for the layout.
  for (const hz of hazards) {
    let labelled = false;
    for (let i = 1; i < hz.points_m.length; i++) {
      const seg = clipSegment(hz.points_m[i - 1], hz.points_m[i], { x0: x0 - 60, x1: x1 + 60, y0: y0 - 60, y1: y1 + 60 });
      if (seg) for (const p of seg) {
        y0 = Math.min(y0, p[1]);
        y1 = Math.max(y1, p[1]);
      }
    }
  }
  const span = Math.max(x1 - x0, y1 - y0, 20);
  const pad = span * 0.12 + 4;
  x0 -= pad;
  x1 += pad;
  y0 -= pad;
  y1 += pad;
  const W = drawingWidth();
  const H_MAX = Math.max(260, Math.min(560, W * 0.9)); // tall enough to read, short enough to scroll past
  const scale = Math.min(W / (x1 - x0), H_MAX / (y1 - y0));
  const H = Math.max(220, (y1 - y0) * scale);
  // Equal scale in x and y: widen both ranges, centred, to the drawing's aspect.
  const xMid = (x0 + x1) / 2;
  x0 = xMid - W / scale / 2;
  x1 = xMid + W / scale / 2;
  const yMid = (y0 + y1) / 2;
  y0 = yMid - H / scale / 2;
  y1 = yMid + H / scale / 2;
  const X = (x) => (x - x0) * scale;
  const Y = (y) => (y1 - y) * scale;
  const svg = s("svg", { viewBox: `0 0 ${W} ${H.toFixed(0)}`, class: "plot sketch", role: "img", "aria-label": "Top-down sketch of the site to scale", "data-testid": "site-sketch" });
  svg.append(s("rect", { x: 0, y: 0, width: W, height: H, class: "sketch-bg" }));
  // light grid every tick
  for (const t of ticks(x0, x1, 6)) svg.append(s("line", { x1: X(t), x2: X(t), y1: 0, y2: H, class: "grid" }));
  for (const t of ticks(y0, y1, 6)) svg.append(s("line", { x1: 0, x2: W, y1: Y(t), y2: Y(t), class: "grid" }));
  if (outline.length >= 3) {
    svg.append(s("polygon", { points: outline.map((p) => `${X(p[0]).toFixed(1)},${Y(p[1]).toFixed(1)}`).join(" "), class: "keep-out", "data-testid": "sketch-keep-out" }));
  }
  for (const hz of hazards) {
    let labelled = false;
    for (let i = 1; i < hz.points_m.length; i++) {
      const seg = clipSegment(hz.points_m[i - 1], hz.points_m[i], { x0, x1, y0, y1 });
      if (!seg) continue;
      const line = hz.kind === "power_line";
      svg.append(s("line", { x1: X(seg[0][0]), y1: Y(seg[0][1]), x2: X(seg[1][0]), y2: Y(seg[1][1]), class: line ? "power-line" : "path-line" }));
      if (labelled) continue; // one label per hazard, on its first visible segment
      labelled = true;
      const lx = Math.min(Math.max(X((seg[0][0] + seg[1][0]) / 2), 80), W - 80);
      const label = line ? `${hz.name}, ${formatLength(hz.height_m, { units, digits: 1 })} high` : hz.name;
      svg.append(s("text", { x: lx, y: Y((seg[0][1] + seg[1][1]) / 2) - 6, class: line ? "hazard-label" : "hazard-label path-label", "text-anchor": "middle", text: label }));
    }
  }
  if (wire.length >= 2) {
    // ropes from each end support to the nearer wire end
    for (const id of option?.supports_used ?? []) {
      const sp = supports.find((v) => v.id === id);
      if (!sp) continue;
      const ends = [wire[0], wire.at(-1)];
      const end = ends.reduce((a, b) => (Math.hypot(b[0] - sp.x_m, b[1] - sp.y_m) < Math.hypot(a[0] - sp.x_m, a[1] - sp.y_m) ? b : a));
      svg.append(s("line", { x1: X(sp.x_m), y1: Y(sp.y_m), x2: X(end[0]), y2: Y(end[1]), class: "rope" }));
    }
    svg.append(s("polyline", { points: wire.map((p) => `${X(p[0]).toFixed(1)},${Y(p[1]).toFixed(1)}`).join(" "), class: "wire-line", "data-testid": "sketch-wire" }));
  }
  svg.append(s("rect", { x: X(0) - 4, y: Y(0) - 4, width: 8, height: 8, class: "origin" }));
  svg.append(s("text", { x: X(0) + 7, y: Y(0) + 14, class: "small-label", text: "0,0" }));
  const used = new Set(option?.supports_used ?? []);
  for (const sp of supports) {
    const cx = X(sp.x_m);
    const cy = Y(sp.y_m);
    const cls = sp.unsafe ? "support unsafe" : used.has(sp.id) ? "support used" : "support";
    svg.append(s("circle", { cx, cy, r: 9, class: cls }));
    if (sp.unsafe) {
      svg.append(s("path", { d: `M${cx - 7} ${cy - 7}L${cx + 7} ${cy + 7}M${cx + 7} ${cy - 7}L${cx - 7} ${cy + 7}`, class: "unsafe-cross" }));
    }
    const right = cx < W - 90;
    svg.append(s("text", { x: cx + (right ? 13 : -13), y: cy - 2, class: "support-label", "text-anchor": right ? "start" : "end", text: sp.id }));
    svg.append(s("text", { x: cx + (right ? 13 : -13), y: cy + 13, class: "small-label", "text-anchor": right ? "start" : "end", text: sp.unsafe ? "unsafe" : formatLength(sp.height_m, { units, digits: 1 }) }));
  }
  // north arrow and scale bar
  svg.append(s("path", { d: `M${W - 18} 30L${W - 24} 44L${W - 18} 40L${W - 12} 44Z`, class: "north" }));
  svg.append(s("text", { x: W - 18, y: 24, class: "small-label", "text-anchor": "middle", text: "N" }));
  const bar = niceBar(x1 - x0, units);
  const bx = 12;
  const by = H - 14;
  svg.append(s("path", { d: `M${bx} ${by - 5}V${by}H${bx + bar.lengthM * scale}V${by - 5}`, class: "scale-bar" }));
  svg.append(s("text", { x: bx + (bar.lengthM * scale) / 2, y: by - 8, class: "small-label", "text-anchor": "middle", text: bar.label }));
  return svg;
}
