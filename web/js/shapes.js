// Reading the service's answers. The contract (ARCHITECTURE.md) fixes the required fields; these helpers
// accept the documented wrappers and report clearly when a required field is missing.

export function deploymentList(data) {
  const list = Array.isArray(data) ? data : data?.deployments ?? data?.items ?? [];
  return list.map((d) => ({ id: String(d.id), name: d.name || d.site_name || String(d.id) }));
}

/** The plan input of a stored deployment (with `name`), the stored plan result and its revision. */
export function readDeployment(data) {
  if (!data || typeof data !== "object") throw new Error("the service sent no deployment");
  const inner = data.deployment && typeof data.deployment === "object" ? data.deployment : data;
  const input =
    (inner.plan_input && typeof inner.plan_input === "object" && inner.plan_input) ||
    (inner.input && typeof inner.input === "object" && inner.input) ||
    (inner.spec && typeof inner.spec === "object" && inner.spec) ||
    inner;
  const dep = structuredClone(input);
  delete dep.id;
  delete dep.plan_result;
  delete dep.plan;
  delete dep.revision;
  delete dep.result;
  dep.name = inner.name ?? input.name ?? "deployment";
  const result = inner.result ?? inner.plan_result ?? inner.plan ?? null;
  return {
    id: String(inner.id ?? data.id),
    dep,
    plan: result && Array.isArray(result.options) ? result : null,
    planError: inner.plan_error ?? null,
    planning: inner.planning === true,
    revision: inner.revision ?? null,
  };
}

/** Checklist items with their state: [{id, stage, text, required, done, by, at, history}]. */
export function readChecks(data) {
  const list = Array.isArray(data) ? data : data?.items ?? data?.checks ?? data?.checklist ?? [];
  return list.map((it) => {
    const st = it.state && typeof it.state === "object" ? it.state : it;
    return {
      id: String(it.id ?? it.item_id),
      stage: it.stage || "pre-raise",
      text: it.text || it.id,
      required: it.required !== false,
      done: Boolean(st.done),
      by: st.by || "",
      at: st.at || "",
      acknowledgements: it.acknowledgements ?? 0,
    };
  });
}

/** The plan input without fields only the store knows. */
export function planInput(dep) {
  const input = structuredClone(dep);
  delete input.name;
  return input;
}

export function supportsById(dep) {
  const map = new Map();
  for (const sp of dep.site?.supports ?? []) map.set(sp.id, sp);
  for (const mast of dep.kit?.masts ?? []) if (!map.has(mast.id)) map.set(mast.id, { ...mast, kind: "mast" });
  return map;
}

export function legLengths(option) {
  const leg = option?.cut?.leg_m;
  if (Array.isArray(leg)) return leg;
  if (Number.isFinite(leg)) return [leg, leg];
  if (leg && typeof leg === "object") return Object.values(leg);
  return [];
}

/** Horizontal length of a polyline [[x, y, z], ...] and its points' distance along it. */
export function alongPolyline(points) {
  const out = [0];
  for (let i = 1; i < points.length; i++) {
    const [a, b] = [points[i - 1], points[i]];
    out.push(out[i - 1] + Math.hypot(b[0] - a[0], b[1] - a[1], (b[2] ?? 0) - (a[2] ?? 0)));
  }
  return out;
}

/** The point at a distance along a polyline. */
export function pointAlong(points, distance) {
  const d = alongPolyline(points);
  for (let i = 1; i < points.length; i++) {
    if (distance <= d[i] || i === points.length - 1) {
      const t = d[i] > d[i - 1] ? Math.min(1, Math.max(0, (distance - d[i - 1]) / (d[i] - d[i - 1]))) : 0;
      return points[i - 1].map((v, k) => v + t * (points[i][k] - v));
    }
  }
  return points[0];
}
