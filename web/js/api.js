// The service API (ARCHITECTURE.md, "Contract: the service"). Same origin only.

import { withPlanProgress } from "./progress.js";

// A request that plans waits for its plan job: the queue and the plan's deadline (docs/service.md).
const PLAN_TIMEOUT_MS = 300000;

export class ApiError extends Error {
  constructor(status, body) {
    const detail = (body && (body.detail || body.error)) || `the service answered ${status}`;
    super(body && body.field ? `${body.field}: ${detail}` : detail);
    this.status = status;
    this.field = (body && body.field) || "";
    this.detail = detail;
  }
}

/** The service could not be reached at all (stopped, Wi-Fi gone). */
export class UnreachableError extends Error {}

const BUSY_AFTER_MS = 250; // show progress for anything slower than a quarter of a second
let busyCount = 0;
let busyTimer = null;
const busyListeners = [];

const savedCopyListeners = [];

/** Called with the path whenever an answer came from the service worker's saved copy. */
export function onSavedCopy(fn) {
  savedCopyListeners.push(fn);
}

export function onBusy(fn) {
  busyListeners.push(fn);
}

function busyStart(label) {
  busyCount += 1;
  if (busyCount === 1) {
    busyTimer = setTimeout(() => busyListeners.forEach((fn) => fn(true, label)), BUSY_AFTER_MS);
  }
}

function busyEnd() {
  busyCount = Math.max(0, busyCount - 1);
  if (busyCount === 0) {
    clearTimeout(busyTimer);
    busyListeners.forEach((fn) => fn(false));
  }
}

export async function request(method, path, body, { label = "Working…", timeoutMs = 120000, headers = {} } = {}) {
  const init = { method, headers: { Accept: "application/json", ...headers }, credentials: "same-origin" };
  if (body !== undefined) {
    init.headers["Content-Type"] = "application/json";
    init.body = JSON.stringify(body);
  }
  const ctrl = new AbortController();
  const timer = setTimeout(() => ctrl.abort(), timeoutMs);
  init.signal = ctrl.signal;
  busyStart(label);
  let res;
  try {
    res = await fetch(path, init);
  } catch (e) {
    throw new UnreachableError(`the service cannot be reached (${e.name === "AbortError" ? "timed out" : "no answer"})`);
  } finally {
    clearTimeout(timer);
    busyEnd();
  }
  let data = null;
  const text = await res.text();
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = null;
    }
  }
  if (res.headers.get("X-Fieldkit-Saved-Copy") === "1") {
    // The service worker answered from its cache: the data is good to show, but the service is away.
    savedCopyListeners.forEach((fn) => fn(path));
  }
  if (!res.ok) throw new ApiError(res.status, data);
  return data;
}

/** A request that plans: its job's progress is shown while it waits (progress.js). */
function planning(method, path, body, label) {
  const send = (job) => request(method, path, body, { label, timeoutMs: PLAN_TIMEOUT_MS, headers: { "X-Fieldkit-Job": job } });
  return withPlanProgress(send, label.replace(/…$/, ""));
}

export const api = {
  request,
  health: () => request("GET", "/api/health", undefined, { timeoutMs: 4000 }),
  listDeployments: () => request("GET", "/api/deployments"),
  getDeployment: (id) => request("GET", `/api/deployments/${encodeURIComponent(id)}`),
  createDeployment: (dep) => planning("POST", "/api/deployments", dep, "Saving and planning…"),
  saveDeployment: (id, dep) => planning("PUT", `/api/deployments/${encodeURIComponent(id)}`, dep, "Saving and planning…"),
  deleteDeployment: (id) => request("DELETE", `/api/deployments/${encodeURIComponent(id)}`),
  plan: (input) => planning("POST", "/api/plan", input, "Planning the antenna…"),
  sky: (input) => request("POST", "/api/sky", input, { label: "Estimating the sky…" }),
  model: (spec) => request("POST", "/api/model", spec, { label: "Modelling the wire…" }),
  checks: (id) => request("GET", `/api/deployments/${encodeURIComponent(id)}/checks`),
  tick: (id, itemId, body) =>
    request("PUT", `/api/deployments/${encodeURIComponent(id)}/checks/${encodeURIComponent(itemId)}`, body, {
      timeoutMs: 8000,
    }),
  kit: () => request("GET", "/api/kit"),
  lan: () => request("GET", "/api/lan"),
};
