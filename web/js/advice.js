// The plan's and the sky's word when no channel of the kit works at some of the scheduled hours:
// a banner for the Sky and Wire sections, from the sky layer's `schedule.when_none_works` (issue 13).
import { h } from "./dom.js";

/** The banner element, or null when every scheduled hour has a working channel. */
export function noChannelBanner(st) {
  const w = st.plan?.sky?.schedule?.when_none_works ?? st.sky?.schedule?.when_none_works;
  if (!w || typeof w.words !== "string") return null;
  const text = w.words.charAt(0).toUpperCase() + w.words.slice(1);
  return h("p", { class: "note warn", role: "status", "data-testid": "no-channel-banner", text });
}
