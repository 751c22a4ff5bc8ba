// fieldkit service worker: keeps the app shell and the deployments viewed, so the laptop opens the app
// with the service stopped. Network first (the laptop's own service answers in milliseconds), the cache
// when the network fails. Only same-origin GET requests are handled; writes always go to the network
// (pending checklist ticks are kept by the app itself, see js/queue.js).

const VERSION = "fieldkit-shell-v5";
const API_CACHE = "fieldkit-api-v1";
const SHELL = [
  "./",
  "index.html",
  "manifest.webmanifest",
  "css/app.css",
  "css/print.css",
  "icons/icon-192.png",
  "icons/icon-512.png",
  "icons/icon-maskable-512.png",
  "js/advice.js",
  "js/api.js",
  "js/app.js",
  "js/card.js",
  "js/checks.js",
  "js/dom.js",
  "js/fields.js",
  "js/mast.js",
  "js/qr.js",
  "js/queue.js",
  "js/shapes.js",
  "js/site.js",
  "js/sketch.js",
  "js/sky.js",
  "js/store.js",
  "js/units.js",
  "js/wire.js",
  "js/kit.js",
  "js/words.js",
  "js/progress.js",
  "js/measured.js",
];
const NETWORK_TIMEOUT_MS = 4000;

self.addEventListener("install", (event) => {
  event.waitUntil(caches.open(VERSION).then((c) => c.addAll(SHELL)).then(() => self.skipWaiting()));
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    caches
      .keys()
      .then((keys) => Promise.all(keys.filter((k) => k !== VERSION && k !== API_CACHE).map((k) => caches.delete(k))))
      .then(() => self.clients.claim()),
  );
});

function fromNetwork(request) {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error("network timeout")), NETWORK_TIMEOUT_MS);
    fetch(request).then(
      (r) => {
        clearTimeout(timer);
        resolve(r);
      },
      (e) => {
        clearTimeout(timer);
        reject(e);
      },
    );
  });
}

async function networkFirst(request, cacheName, { navigation = false } = {}) {
  const cache = await caches.open(cacheName);
  try {
    const response = await fromNetwork(request);
    if (response.ok) cache.put(navigation ? "index.html" : request, response.clone());
    return response;
  } catch (e) {
    const hit = navigation
      ? (await cache.match("index.html")) ?? (await cache.match("./"))
      : await cache.match(request, { ignoreSearch: !new URL(request.url).pathname.startsWith("/api/") });
    if (!hit) throw e;
    if (navigation || !new URL(request.url).pathname.startsWith("/api/")) return hit;
    // Tell the app this answer is a saved copy: the service itself did not answer.
    const headers = new Headers(hit.headers);
    headers.set("X-Fieldkit-Saved-Copy", "1");
    return new Response(await hit.blob(), { status: hit.status, statusText: hit.statusText, headers });
  }
}

self.addEventListener("fetch", (event) => {
  const request = event.request;
  if (request.method !== "GET") return;
  const url = new URL(request.url);
  if (url.origin !== self.location.origin) return;
  if (url.pathname.startsWith("/api/plans")) return; // a plan's progress: now or not at all
  if (url.pathname.startsWith("/api/")) {
    event.respondWith(networkFirst(request, API_CACHE));
    return;
  }
  event.respondWith(networkFirst(request, VERSION, { navigation: request.mode === "navigate" }));
});
