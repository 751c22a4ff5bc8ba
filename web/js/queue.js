// Pending checklist ticks. Every tick is written here first, with its own client id, and removed only
// when the service has answered 2xx for it. Replays send the same client id, which the service treats as
// the same record, so a tick sent twice (an answer lost on the way back) is never counted twice.

import { ApiError, UnreachableError } from "./api.js";
import { kvGet, kvUpdate, newClientId } from "./store.js";

const KEY = "pending-ticks";

export async function list() {
  return (await kvGet(KEY)) ?? [];
}

export async function add({ deployment_id, item_id, done, by, at }) {
  const entry = { deployment_id, item_id, body: { done, by, at, client_id: newClientId() }, queued_at: new Date().toISOString() };
  await kvUpdate(KEY, (cur) => [...(cur ?? []), entry]);
  return entry;
}

async function remove(clientId) {
  await kvUpdate(KEY, (cur) => (cur ?? []).filter((e) => e.body.client_id !== clientId));
}

/**
 * Send the pending ticks in the order they were made. Stops at the first that cannot reach the service.
 * A tick the service refuses as bad input (4xx) is dropped from the queue and reported, so one bad entry
 * cannot block the others forever; server faults (5xx) stay queued.
 */
export async function replay(send) {
  const out = { sent: 0, failed: [], unreachable: false };
  for (const entry of await list()) {
    try {
      await send(entry);
      await remove(entry.body.client_id);
      out.sent++;
    } catch (e) {
      if (e instanceof UnreachableError) {
        out.unreachable = true;
        break;
      }
      if (e instanceof ApiError && e.status >= 400 && e.status < 500 && e.status !== 401 && e.status !== 408 && e.status !== 429) {
        await remove(entry.body.client_id);
        out.failed.push({ entry, error: e });
      } else {
        out.unreachable = true;
        break;
      }
    }
  }
  return out;
}
