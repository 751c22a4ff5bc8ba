// Plan progress: while the service plans, a real bar and the stage in words in the busy strip.
//
// A request that plans (Save and plan, import) names its plan job with its own id (the
// X-Fieldkit-Job header); meanwhile GET /api/plans/<id> on another connection says how far the job
// is: its stage, done of total, or its place in the queue (docs/service.md, "Plans as jobs").

const POLL_MS = 500;
// The planner's stages in order (fieldkit.planning.STAGES), after "starting".
const ORDER = ["starting", "layouts", "height sweeps", "resonance", "safety", "result"];
const WORDS = {
  starting: "Starting the planner",
  layouts: "Laying the wire out between the supports",
  "height sweeps": "Trying rope heights",
  resonance: "Working out the cut lengths",
  safety: "Checking keep-out distances and clearances",
  result: "Putting the plan together",
};

/** A new id for a plan job (a UUID, as the service expects). */
export function newJobId() {
  if (globalThis.crypto?.randomUUID) return crypto.randomUUID();
  const b = crypto.getRandomValues(new Uint8Array(16));
  b[6] = (b[6] & 0x0f) | 0x40;
  b[8] = (b[8] & 0x3f) | 0x80;
  const x = [...b].map((v) => v.toString(16).padStart(2, "0")).join("");
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20)}`;
}

/** Plain words for a job's state: "Trying rope heights (6 of 17)", "waiting, 2 plans ahead in line". */
export function describe(job) {
  if (job.state === "queued") {
    const ahead = Math.max(0, (job.queue_position ?? 1) - 1);
    return ahead ? `waiting, ${ahead} plan${ahead === 1 ? "" : "s"} ahead in line` : "waiting, next in line";
  }
  const words = WORDS[job.stage] ?? "Planning";
  return job.total > 1 ? `${words} (${job.done} of ${job.total})` : words;
}

/** How far the whole plan is, 0 to 1: the stages in order, each split by its done of total. */
export function fraction(job) {
  const at = ORDER.indexOf(job.stage);
  if (job.state === "done") return 1;
  if (at < 0) return 0;
  const within = job.total > 0 ? Math.min(1, job.done / job.total) : 0;
  return (at + within) / ORDER.length;
}

function show(job, label) {
  const busy = document.getElementById("busy");
  if (!busy) return;
  const text = document.getElementById("busy-text");
  let bar = busy.querySelector("progress");
  if (!bar) {
    bar = document.createElement("progress");
    bar.max = 1;
    bar.dataset.testid = "plan-progress";
    bar.setAttribute("aria-label", "How far the plan is");
    // set through the CSSOM (the page's CSP allows no style attributes): the strip's own colour,
    // in place of the sliding "working" bar while the real one shows
    bar.style.accentColor = "currentColor";
    bar.style.flex = "0 0 30%";
    busy.insertBefore(bar, text);
    const sliding = busy.querySelector(".busy-bar");
    if (sliding) sliding.style.display = "none";
  }
  bar.value = fraction(job);
  if (text) text.textContent = `${label}: ${describe(job)}`;
}

function hide() {
  document.querySelector("#busy progress")?.remove();
  const sliding = document.querySelector("#busy .busy-bar");
  if (sliding) sliding.style.display = "";
}

/**
 * Run ``send(jobId)`` (a request that plans, sending X-Fieldkit-Job: jobId) and show its job's
 * progress under ``label`` ("Saving and planning") until it answers. Returns what ``send`` returns.
 */
export async function withPlanProgress(send, label = "Planning") {
  const id = newJobId();
  let on = true;
  const follow = async () => {
    while (on) {
      await new Promise((r) => setTimeout(r, POLL_MS));
      if (!on) break;
      try {
        const res = await fetch(`/api/plans/${id}`, { headers: { Accept: "application/json" }, credentials: "same-origin" });
        if (res.ok && on) show(await res.json(), label); // 404: the request is not there yet
      } catch {
        // the service is away: the request that plans reports it
      }
    }
  };
  follow();
  try {
    return await send(id);
  } finally {
    on = false;
    hide();
  }
}
