// Sky: the channel day (hours × channels, coloured by reach), sunrise and sunset, the sounding entry, and
// the recommended channel for the schedule window.

import { noChannelBanner } from "./advice.js";
import { ApiError, UnreachableError } from "./api.js";
import { clear, h } from "./dom.js";
import { field, numberField } from "./fields.js";
import { distanceUnit, EntryError, formatMHz, KM_PER_MILE, toDisplayDistance } from "./units.js";

const STATIONS_KEY = "fieldkit.stations_km";

/** Distances of the stations to reach [km], typed once and kept on the device. */
export function stationsKm() {
  try {
    const v = JSON.parse(localStorage.getItem(STATIONS_KEY) || "[]");
    return Array.isArray(v) ? v.filter((x) => Number.isFinite(x)) : [];
  } catch {
    return [];
  }
}

export function skyInput(dep) {
  const sky = structuredClone(dep.sky ?? {});
  sky.site = { ...(sky.site ?? {}), lat_deg: dep.site.lat_deg, lon_deg: dep.site.lon_deg };
  sky.channels_mhz = dep.channels_mhz;
  if (dep.radio?.power_w && sky.power_w === undefined) sky.power_w = dep.radio.power_w;
  const schedule = { start_utc: dep.schedule?.start_utc ?? "16:00", end_utc: dep.schedule?.end_utc ?? "20:00" };
  const stations = stationsKm();
  if (stations.length) schedule.distances_km = stations;
  sky.schedule = schedule;
  return sky;
}

/** Fetch the sky estimate for the deployment, once per input. */
export async function ensureSky(app) {
  const st = app.state;
  const input = skyInput(st.dep);
  const key = JSON.stringify(input);
  if (st.sky && st.skyFor === key) return st.sky;
  if (!input.date || !Number.isFinite(input.site.lat_deg)) {
    st.skyError = "Set the place and date in Site first.";
    return null;
  }
  try {
    st.sky = await app.call(() => app.api.sky(input));
    st.skyFor = key;
    st.skyError = null;
    await app.saveView();
  } catch (e) {
    st.skyError = e instanceof UnreachableError ? `${e.message}; showing the last estimate saved on this device.` : e.message;
    if (e instanceof ApiError) {
      st.sky = null;
      if (st.section === "sky") setTimeout(() => app.reportFieldError(e), 0);
    }
  }
  return st.sky;
}

/** Hours as a number from 18.5, "18:30" or an ISO date-time. */
export function hourOf(value) {
  if (Number.isFinite(value)) return value;
  if (typeof value !== "string") return null;
  const m = value.match(/(\d{1,2}):(\d{2})/);
  return m ? Number(m[1]) + Number(m[2]) / 60 : null;
}

export function hhmm(hours) {
  if (!Number.isFinite(hours)) return "–";
  const mins = Math.round(hours * 60) % 1440;
  return `${String(Math.floor(mins / 60)).padStart(2, "0")}:${String(mins % 60).padStart(2, "0")}`;
}

/** Whole UTC hours inside the schedule window, both ends included (as the sky layer counts them). */
export function scheduleHours(dep) {
  const a = hourOf(dep.schedule?.start_utc ?? "16:00");
  const b = hourOf(dep.schedule?.end_utc ?? "20:00");
  const out = [];
  for (let hr = 0; hr < 24; hr++) if (a <= b ? hr >= a && hr <= b : hr >= a || hr <= b) out.push(hr);
  return out;
}

function reachClass(cell) {
  const r = cell?.max_range_km ?? 0;
  if (!(r > 0)) return "reach-0";
  if (r < 100) return "reach-1";
  if (r < 250) return "reach-2";
  return "reach-3";
}

export function render(app, panel) {
  clear(panel);
  panel.append(h("h2", { text: "Sky — the channel day" }));
  const body = h("div", { "data-sky-body": "1" });
  panel.append(body);
  refresh(app, panel);
  if (!app.state.sky || app.state.skyFor !== JSON.stringify(skyInput(app.state.dep))) {
    ensureSky(app).then(() => {
      if (app.state.section === "sky") refresh(app, panel);
    });
  }
}

export function refresh(app, panel) {
  const st = app.state;
  const body = panel.querySelector("[data-sky-body]");
  if (!body) return render(app, panel);
  clear(body);
  const units = st.units;
  const sky = st.sky;
  if (st.skyError) body.append(h("p", { class: "note warn", "data-testid": "sky-error", text: st.skyError }));
  if (!sky) {
    body.append(h("p", { class: "note", text: "Waiting for the sky estimate…" }));
    body.append(soundingForm(app));
    return;
  }
  const hours = scheduleHours(st.dep);
  const banner = noChannelBanner(st);
  if (banner) body.append(banner);
  const rise = hourOf(sky.sunrise_utc);
  const set = hourOf(sky.sunset_utc);
  body.append(recommendation(sky, units));
  body.append(stationsField(app, panel, units));
  body.append(h("p", { class: "sun-line", "data-testid": "sun-times" }, [
    h("span", { class: "sun-mark rise", text: "▲" }), ` sunrise ${hhmm(rise)} UTC   `,
    h("span", { class: "sun-mark set", text: "▼" }), ` sunset ${hhmm(set)} UTC`,
  ]));
  body.append(dayTable(sky, hours, rise, set, units));
  body.append(h("p", { class: "legend-line" }, [
    "Reach (farthest distance): ", h("span", { class: "key reach-0" }), "none ", h("span", { class: "key reach-1" }), "< 100 km ",
    h("span", { class: "key reach-2" }), "100–250 km ", h("span", { class: "key reach-3" }), "> 250 km. ",
    "Numbers are the reach in ", distanceUnit(units), " (“+”: beyond the farthest distance computed); “skip”: nothing is heard nearer than this. Boxed rows: your schedule.",
  ]));
  body.append(soundingForm(app));
}

function recommendation(sky, units) {
  const rec = sky.schedule;
  const box = h("div", { class: "card recommend", "data-testid": "recommended" });
  if (!rec) return box;
  box.append(h("p", { class: "label", text: `Recommended for ${rec.start_utc}–${rec.end_utc} UTC` }));
  box.append(h("p", { class: "big", "data-testid": "recommended-channel", text: rec.recommended_mhz ? formatMHz(rec.recommended_mhz) : "none" }));
  box.append(h("p", { text: rec.why }));
  if (Array.isArray(rec.channels) && rec.channels.length) {
    const t = h("table", { class: "plain compact" });
    t.append(h("thead", {}, [h("tr", {}, [h("th", { text: "MHz" }), h("th", { text: "hours it works" }), h("th", { text: "hours of full reach" }), h("th", { text: "weakest hour" })])]));
    const tb = h("tbody");
    for (const c of rec.channels) {
      tb.append(h("tr", { class: c.frequency_mhz === rec.recommended_mhz ? "best" : "" }, [
        h("td", { text: String(c.frequency_mhz) }), h("td", { text: `${c.hours_working}/${c.hours_in_window}` }),
        h("td", { text: `${c.hours_full}/${c.hours_in_window}` }), h("td", { text: c.worst_verdict }),
      ]));
    }
    t.append(tb);
    box.append(h("div", { class: "table-wrap" }, [t]));
  }
  return box;
}

function stationsField(app, panel, units) {
  const cur = stationsKm();
  let timer = null;
  return field({
    label: `Stations to reach (${distanceUnit(units)}, comma separated; empty: the whole 0–300 km NVIS zone)`,
    value: cur.map((km) => Math.round(toDisplayDistance(km, units))).join(", "), testid: "stations", inputmode: "decimal",
    parse: (t) => {
      const parts = String(t).split(/[,;\s]+/).filter(Boolean);
      return parts.map((p) => {
        const m = p.match(/^(\d+(?:\.\d+)?)(km|mi)?$/i);
        if (!m) throw new EntryError(`"${p}" is not a distance; type e.g. 60, 140 or 40 mi`);
        const v = Number(m[1]) * ((m[2] || distanceUnit(units)).toLowerCase() === "mi" ? KM_PER_MILE : 1);
        if (v > 600) throw new EntryError("NVIS distances: at most 600 km");
        return +v.toFixed(1);
      });
    },
    onValid: (v) => {
      clearTimeout(timer);
      timer = setTimeout(async () => {
        localStorage.setItem(STATIONS_KEY, JSON.stringify(v));
        await ensureSky(app);
        if (app.state.section === "sky") refresh(app, panel);
      }, 700);
    },
  });
}

function dayTable(sky, hours, rise, set, units) {
  const wrap = h("div", { class: "table-wrap" });
  const table = h("table", { class: "channel-day", "data-testid": "channel-day" });
  const head = h("tr", {}, [h("th", { scope: "col", text: "UTC" }), h("th", { scope: "col", class: "fo", text: "foF2" })]);
  for (const ch of sky.channels) head.append(h("th", { scope: "col", text: `${ch.frequency_mhz}` }));
  table.append(h("thead", {}, [head]));
  const tbody = h("tbody");
  const hoursUtc = sky.hours_utc ?? [...Array(24).keys()];
  hoursUtc.forEach((hr, i) => {
    const inSchedule = hours.includes(hr);
    const tr = h("tr", { class: inSchedule ? "in-schedule" : "", "data-hour": hr });
    const marks = [];
    if (Number.isFinite(rise) && Math.floor(rise) === hr) marks.push(h("span", { class: "sun-mark rise", title: `sunrise ${hhmm(rise)}`, text: "▲" }));
    if (Number.isFinite(set) && Math.floor(set) === hr) marks.push(h("span", { class: "sun-mark set", title: `sunset ${hhmm(set)}`, text: "▼" }));
    const dark = Number.isFinite(rise) && Number.isFinite(set) && (rise < set ? hr + 0.5 < rise || hr + 0.5 > set : hr + 0.5 > set && hr + 0.5 < rise);
    tr.append(h("th", { scope: "row", class: dark ? "night-hour" : "day-hour" }, [String(hr).padStart(2, "0"), ...marks]));
    tr.append(h("td", { class: "fo", text: Number.isFinite(sky.fof2_mhz?.[i]) ? sky.fof2_mhz[i].toFixed(1) : "–" }));
    for (const ch of sky.channels) {
      const c = ch.by_hour.find((x) => x.hour_utc === hr);
      const td = h("td", { class: reachClass(c), title: c?.verdict ?? "", tabindex: "0", "data-verdict": c ? `${String(hr).padStart(2, "0")}:00 UTC, ${ch.frequency_mhz} MHz: ${c.verdict}` : "" });
      const top = Math.max(...(sky.distances_km ?? [Infinity]));
      const reach = c && c.max_range_km > 0 ? `${Math.round(toDisplayDistance(c.max_range_km, units))}${c.max_range_km >= top ? "+" : ""}` : "–";
      td.append(h("span", { class: "reach", text: reach }));
      if (c && c.skip_km > 0 && c.max_range_km > 0) td.append(h("span", { class: "skip", text: `skip ${Math.round(toDisplayDistance(c.skip_km, units))}` }));
      tr.append(td);
    }
    tbody.append(tr);
  });
  table.append(tbody);
  const said = h("p", { class: "verdict", "data-testid": "verdict", "aria-live": "polite", text: "Tap a cell for its verdict." });
  const tell = (ev) => {
    const td = ev.target.closest("td[data-verdict]");
    if (td && td.dataset.verdict) said.textContent = td.dataset.verdict;
  };
  table.addEventListener("click", tell);
  table.addEventListener("focusin", tell);
  wrap.append(table);
  return h("div", {}, [said, wrap]);
}

function soundingForm(app) {
  const dep = app.state.dep;
  const cur = dep.sky?.sounding;
  const box = h("details", { class: "card", "data-testid": "sounding", open: Boolean(cur) });
  box.append(h("summary", { "data-testid": "sounding-summary", text: cur ? `Sounding in use: foF2 ${cur.fof2_mhz} MHz, h′F ${cur.virtual_height_km} km${cur.hour_utc !== undefined ? ` at ${hhmm(cur.hour_utc)} UTC` : ""}` : "Enter a sounding (an observed reading)" }));
  box.append(h("p", { class: "hint", text: "A reading from an ionosonde or a near-vertical sounding overrides the sky estimate near its hour (without an hour: for the whole day)." }));
  let fo = cur?.fof2_mhz ?? null;
  let hv = cur?.virtual_height_km ?? 300;
  const f1 = numberField({ label: "foF2 (MHz)", value: fo ?? "", min: 0.5, max: 20, what: "a frequency in MHz", fieldPath: "sounding.fof2_mhz", testid: "sounding-fof2", onValid: (v) => (fo = v) });
  const f2 = numberField({ label: "Virtual height h′F (km)", value: hv, min: 150, max: 800, what: "a height in km", fieldPath: "sounding.virtual_height_km", testid: "sounding-height", onValid: (v) => (hv = v) });
  let hr = cur?.hour_utc ?? null;
  const f3 = field({
    label: "Hour of the reading (UTC; empty: the whole day)", value: cur?.hour_utc ?? "", fieldPath: "sounding.hour_utc", testid: "sounding-hour", inputmode: "decimal",
    parse: (t) => {
      const v = String(t).trim();
      if (!v) return null;
      const m = v.match(/^(\d{1,2})(?::(\d{2}))?$/);
      if (!m || Number(m[1]) > 23 || Number(m[2] ?? 0) > 59) throw new EntryError("expected an hour 0–23 or HH:MM, UTC");
      return Number(m[1]) + Number(m[2] ?? 0) / 60;
    },
    onValid: (v) => (hr = v),
  });
  box.append(h("div", { class: "grid-form" }, [f1, f2, f3]));
  const use = h("button", { type: "button", class: "primary", "data-testid": "sounding-use", text: "Use this sounding" });
  use.addEventListener("click", () => {
    if (!f1.check().ok || !f2.check().ok || !f3.check().ok) return;
    app.change((d) => {
      d.sky = d.sky ?? {};
      d.sky.sounding = { fof2_mhz: fo, virtual_height_km: hv };
      if (hr !== null) d.sky.sounding.hour_utc = +hr.toFixed(2);
    });
    app.state.sky = null;
    app.render();
  });
  const drop = h("button", { type: "button", text: "Back to the estimate", disabled: !cur });
  drop.addEventListener("click", () => {
    app.change((d) => delete d.sky.sounding);
    app.state.sky = null;
    app.render();
  });
  box.append(h("div", { class: "row" }, [use, drop]));
  return box;
}
