// Small DOM and SVG helpers. No innerHTML with data: everything goes through textContent.

const SVG_NS = "http://www.w3.org/2000/svg";

function apply(node, attrs) {
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === null || v === undefined || v === false) continue;
    if (k === "text") node.textContent = v;
    else if (k === "on") for (const [ev, fn] of Object.entries(v)) node.addEventListener(ev, fn);
    else if (k === "dataset") Object.assign(node.dataset, v);
    else if (k === "value" && "value" in node) node.value = v;
    else if (k === "checked" && "checked" in node) node.checked = v;
    else node.setAttribute(k, v === true ? "" : String(v));
  }
}

function append(node, children) {
  for (const c of [].concat(children ?? [])) {
    if (c === null || c === undefined || c === false) continue;
    node.append(c instanceof Node ? c : document.createTextNode(String(c)));
  }
}

/** HTML element: h("p", {class: "x"}, ["text", child]). */
export function h(tag, attrs, children) {
  const node = document.createElement(tag);
  apply(node, attrs);
  append(node, children);
  return node;
}

/** SVG element. */
export function s(tag, attrs, children) {
  const node = document.createElementNS(SVG_NS, tag);
  apply(node, attrs);
  append(node, children);
  return node;
}

export function clear(node) {
  while (node.firstChild) node.firstChild.remove();
  return node;
}

/** Width for a full-width drawing, in CSS pixels, so its text stays at its stated size on any screen. */
export function drawingWidth() {
  const main = document.querySelector("main");
  const w = (main?.clientWidth ?? 360) - 44;
  return Math.round(Math.max(360, Math.min(1000, w)));
}

/** "Nice" tick values covering [lo, hi] (1-2-5 steps). */
export function ticks(lo, hi, count = 5) {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * mag).find((st) => st >= raw) ?? 10 * mag;
  const out = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + step * 1e-9; v += step) out.push(+v.toFixed(10));
  return out;
}

export function fmtTick(v) {
  const a = Math.abs(v);
  if (a >= 100 || Number.isInteger(v)) return String(Math.round(v));
  if (a >= 10) return v.toFixed(1).replace(/\.0$/, "");
  return String(+v.toFixed(2));
}

/**
 * A line plot in SVG, sized by its viewBox so it scales with the screen.
 * opts: {title, x: {min, max, label}, y: {min, max, label}, series: [{points: [[x, y]], cls, label}],
 *        vlines: [{x, cls, label}], hlines: [{y, cls, label}], points: [{x, y, cls, label}], testid}
 */
export function linePlot(opts) {
  const W = 360;
  const H = opts.height ?? 230;
  const m = { l: 46, r: 12, t: opts.title ? 24 : 10, b: 42 };
  const pw = W - m.l - m.r;
  const ph = H - m.t - m.b;
  const { x, y } = opts;
  const sx = (v) => m.l + ((v - x.min) / (x.max - x.min)) * pw;
  const sy = (v) => m.t + ph - ((v - y.min) / (y.max - y.min)) * ph;
  const svg = s("svg", {
    viewBox: `0 0 ${W} ${H}`,
    class: `plot ${opts.cls || ""}`,
    role: "img",
    "aria-label": opts.title || `${y.label} against ${x.label}`,
    "data-testid": opts.testid,
  });
  if (opts.title) svg.append(s("text", { x: W / 2, y: 15, class: "plot-title", "text-anchor": "middle", text: opts.title }));
  svg.append(s("rect", { x: m.l, y: m.t, width: pw, height: ph, class: "plot-frame" }));
  for (const t of ticks(x.min, x.max, opts.xTicks ?? 5)) {
    svg.append(s("line", { x1: sx(t), x2: sx(t), y1: m.t, y2: m.t + ph, class: "grid" }));
    svg.append(s("text", { x: sx(t), y: m.t + ph + 15, class: "tick", "text-anchor": "middle", text: fmtTick(t) }));
  }
  for (const t of ticks(y.min, y.max, opts.yTicks ?? 4)) {
    svg.append(s("line", { x1: m.l, x2: m.l + pw, y1: sy(t), y2: sy(t), class: "grid" }));
    svg.append(s("text", { x: m.l - 5, y: sy(t) + 4, class: "tick", "text-anchor": "end", text: fmtTick(t) }));
  }
  svg.append(s("text", { x: m.l + pw / 2, y: H - 6, class: "axis-label", "text-anchor": "middle", text: x.label }));
  svg.append(
    s("text", {
      x: 12, y: m.t + ph / 2, class: "axis-label", "text-anchor": "middle",
      transform: `rotate(-90 12 ${m.t + ph / 2})`, text: y.label,
    }),
  );
  const clip = `clip${Math.random().toString(36).slice(2, 8)}`;
  svg.append(s("clipPath", { id: clip }, [s("rect", { x: m.l, y: m.t, width: pw, height: ph })]));
  const g = s("g", { "clip-path": `url(#${clip})` });
  svg.append(g);
  for (const hl of opts.hlines || []) {
    g.append(s("line", { x1: m.l, x2: m.l + pw, y1: sy(hl.y), y2: sy(hl.y), class: hl.cls || "mark" }));
    if (hl.label) g.append(s("text", { x: m.l + pw - 4, y: sy(hl.y) - 4, class: "mark-label", "text-anchor": "end", text: hl.label }));
  }
  for (const vl of opts.vlines || []) {
    g.append(s("line", { x1: sx(vl.x), x2: sx(vl.x), y1: m.t, y2: m.t + ph, class: vl.cls || "mark" }));
    if (vl.label) {
      const right = sx(vl.x) > m.l + pw * 0.6;
      g.append(
        s("text", {
          x: sx(vl.x) + (right ? -4 : 4), y: m.t + 14 + (vl.row || 0) * 14, class: "mark-label",
          "text-anchor": right ? "end" : "start", text: vl.label,
        }),
      );
    }
  }
  for (const se of opts.series || []) {
    const pts = se.points.filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
    if (!pts.length) continue;
    g.append(s("polyline", { points: pts.map((p) => `${sx(p[0]).toFixed(1)},${sy(p[1]).toFixed(1)}`).join(" "), class: se.cls || "series" }));
  }
  for (const p of opts.points || []) {
    g.append(s("circle", { cx: sx(p.x), cy: sy(p.y), r: 5, class: p.cls || "dot" }));
    if (p.label) {
      const right = sx(p.x) > m.l + pw * 0.6;
      g.append(s("text", { x: sx(p.x) + (right ? -8 : 8), y: sy(p.y) - 8, class: "mark-label", "text-anchor": right ? "end" : "start", text: p.label }));
    }
  }
  if (opts.legend && opts.legend.length) {
    let lx = m.l + 6;
    const ly = m.t + ph - 8;
    for (const item of opts.legend) {
      g.append(s("line", { x1: lx, x2: lx + 18, y1: ly - 4, y2: ly - 4, class: item.cls }));
      const t = s("text", { x: lx + 22, y: ly, class: "legend", text: item.label });
      g.append(t);
      lx += 34 + item.label.length * 7.6;
    }
  }
  return svg;
}
