// Card: the one-screen field card for the person at the tree, its print layout and its QR code.

import { clear, h } from "./dom.js";
import { qrSvg } from "./qr.js";
import { readiness } from "./checks.js";
import { legLengths } from "./shapes.js";
import { formatLength, formatMHz } from "./units.js";

/** The essentials as plain text: a phone camera shows it with no network at all. */
export function cardText(dep, o, units) {
  const f = (m, d = 1) => formatLength(m, { units, digits: d });
  const legs = legLengths(o);
  const lines = [
    "fieldkit field card",
    dep.name,
    `${formatMHz(o.frequency_mhz)} ${o.form}`,
    `Ropes: ${Object.entries(o.rope_heights_m ?? {}).map(([id, m]) => `${id} ${f(m)}`).join(", ")}`,
    `Legs: ${legs.map((l) => f(l, 2)).join(" + ")}`,
    `Wrap ${f(o.cut?.wrap_allowance_m, 2)} each end; total wire ${f(o.cut?.total_wire_m, 2)}`,
    `Feedpoint ${f(o.feedpoint_height_m)}`,
    `Keep-out ${f(o.safety?.keep_out_m ?? 0)} while sending`,
  ];
  if (Number.isFinite(o.safety?.min_end_height_m)) lines.push(`Ends at least ${f(o.safety.min_end_height_m)} high`);
  return lines.join("\n");
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

export function render(app, panel) {
  const st = app.state;
  const units = st.units;
  clear(panel);
  const o = st.plan?.options?.[0];
  if (!o) {
    panel.append(h("h2", { text: "Field card" }), h("p", { class: "note warn", text: st.planError || "No plan yet: add the supports in Site." }));
    return;
  }
  const r = readiness(app);
  const f = (m, d = 1) => formatLength(m, { units, digits: d });
  const cardEl = h("article", { class: "field-card", "data-testid": "field-card" });
  cardEl.append(h("header", { class: "fc-head" }, [
    h("h2", { text: st.dep.name }),
    h("p", { class: "fc-sub", text: `${formatMHz(o.frequency_mhz)} · ${o.form} · ${(o.supports_used ?? []).join(" – ")}` }),
  ]));
  const ropes = h("section", { class: "fc-block" }, [h("h3", { text: "Rope heights" })]);
  const dl = h("dl", { class: "big-list" });
  for (const [id, m] of Object.entries(o.rope_heights_m ?? {})) dl.append(h("dt", { text: id }), h("dd", { "data-testid": `card-rope-${id}`, text: f(m) }));
  dl.append(h("dt", { text: "feedpoint" }), h("dd", { text: f(o.feedpoint_height_m) }));
  ropes.append(dl);
  const cut = h("section", { class: "fc-block" }, [h("h3", { text: "Cut" })]);
  const dl2 = h("dl", { class: "big-list" });
  legLengths(o).forEach((l, i) => dl2.append(h("dt", { text: `leg ${i === 0 ? "A" : "B"}` }), h("dd", { "data-testid": `card-leg-${i}`, text: f(l, 2) })));
  dl2.append(h("dt", { text: "wrap, each end" }), h("dd", { text: f(o.cut?.wrap_allowance_m, 2) }));
  dl2.append(h("dt", { text: "total wire" }), h("dd", { text: f(o.cut?.total_wire_m, 2) }));
  cut.append(dl2);
  const safe = h("section", { class: "fc-block" }, [h("h3", { text: "Keep clear" })]);
  const dl3 = h("dl", { class: "big-list" });
  dl3.append(h("dt", { text: "keep-out while sending" }), h("dd", { "data-testid": "card-keep-out", text: (o.safety?.keep_out_m ?? 0) > 0 ? f(o.safety.keep_out_m) : "none" }));
  if (Number.isFinite(o.safety?.min_end_height_m)) dl3.append(h("dt", { text: "ends at least" }), h("dd", { text: f(o.safety.min_end_height_m) }));
  for (const c of tightestClearances(o)) {
    dl3.append(h("dt", { text: `power line ${c.hazard + 1}: ${c.object}` }), h("dd", { class: c.ok ? "" : "warn", text: `${f(c.distance_m, 0)} ≥ ${f(c.required_m, 0)}` }));
  }
  safe.append(dl3);
  const openChecks = h("section", { class: "fc-block fc-checks" }, [h("h3", { text: r.ready ? "Ready to raise" : `Open required checks (${r.open.length})` })]);
  if (r.raiseOk === false) openChecks.append(h("p", { class: "warn", text: "Do not raise: a clearance fails." }));
  const ul = h("ul", { "data-testid": "card-open-checks" });
  for (const c of r.open) ul.append(h("li", { text: c.text }));
  if (r.ready) openChecks.append(h("p", { text: `All ${st.checks.filter((c) => c.stage === "pre-raise" && c.required).length} required pre-raise checks ticked${r.pending.length ? " (some still to reach the service)" : ""}.` }));
  openChecks.append(ul);
  const qr = h("section", { class: "fc-block fc-qr" }, [qrSvg(cardText(st.dep, o, units), { label: "QR code of the field card", testid: "card-qr" }), h("p", { class: "hint", text: "Scan: the card as text, no network needed." })]);
  cardEl.append(h("div", { class: "fc-grid" }, [ropes, cut, safe, openChecks, qr]));
  const cautions = (o.safety?.cautions ?? []).slice(0, 4);
  if (cautions.length) cardEl.append(h("ul", { class: "fc-cautions" }, cautions.map((c) => h("li", { text: c }))));
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
