// Reading the service's answers, in the one shape the service sends (fieldkit/service/deployments_api.py,
// checks_api.py; ARCHITECTURE.md): nothing else is guessed at, so a change of the contract shows here.

/** GET /api/deployments → {deployments: [{id, name, ...}]}. */
export function deploymentList(data) {
  return (data?.deployments ?? []).map((d) => ({ id: String(d.id), name: d.name }));
}

/**
 * GET/PUT /api/deployments/<id> → {id, name, input, result, plan_error, planning, revision, ...}: the
 * plan input (with `name` added back), the stored plan result, its error and revision.
 */
export function readDeployment(data) {
  if (!data || typeof data !== "object" || typeof data.input !== "object" || data.input === null) throw new Error("the service sent no deployment");
  const dep = structuredClone(data.input);
  dep.name = data.name;
  const result = data.result;
  return {
    id: String(data.id),
    dep,
    plan: result && Array.isArray(result.options) ? result : null,
    planError: data.plan_error ?? null,
    planning: data.planning === true,
    revision: data.revision ?? null,
  };
}

/** GET /api/deployments/<id>/checks → {items: [{id, stage, text, title, required, done, by, at, acknowledgements}]}. */
export function readChecks(data) {
  return (data?.items ?? []).map((it) => ({
    id: String(it.id),
    stage: it.stage,
    text: it.text,
    title: it.title || it.text,
    required: it.required !== false,
    done: it.done === true,
    by: it.by || "",
    at: it.at || "",
    acknowledgements: it.acknowledgements ?? 0,
  }));
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

/** The electrical leg lengths of an option, feedpoint to end insulator (the model's figure) [m]. */
export function legLengths(option) {
  return option?.cut?.leg_m ?? [];
}

/** The option's cut instruction (fieldkit.rigging.instruction), or null for a plan made before it. */
export function cutInstruction(option) {
  return option?.cut?.instruction ?? null;
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
