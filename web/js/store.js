// Device storage for pending ticks and the deployments viewed. On the laptop (a secure context, with the
// service worker) IndexedDB; on phones that reach the laptop over plain HTTP, and wherever IndexedDB
// refuses to open (some private modes), localStorage: synchronous, so a tick is on the device before the
// tap's handler returns, and it survives the browser tab being closed.

const DB_NAME = "fieldkit";
const STORE = "kv";
const LS_PREFIX = "fieldkit.kv.";

let dbPromise = null;

function openDb() {
  if (dbPromise) return dbPromise;
  dbPromise = new Promise((resolve) => {
    if (typeof indexedDB === "undefined" || !globalThis.isSecureContext) return resolve(null);
    let req;
    try {
      req = indexedDB.open(DB_NAME, 1);
    } catch {
      return resolve(null);
    }
    req.onupgradeneeded = () => req.result.createObjectStore(STORE);
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => resolve(null);
    req.onblocked = () => resolve(null);
  });
  return dbPromise;
}

function lsGet(key) {
  try {
    const v = localStorage.getItem(LS_PREFIX + key);
    return v === null ? undefined : JSON.parse(v);
  } catch {
    return undefined;
  }
}

function lsSet(key, value) {
  localStorage.setItem(LS_PREFIX + key, JSON.stringify(value));
}

export async function backend() {
  return (await openDb()) ? "indexeddb" : "localstorage";
}

export async function kvGet(key) {
  const db = await openDb();
  if (!db) return lsGet(key);
  return new Promise((resolve, reject) => {
    const tx = db.transaction(STORE, "readonly");
    const req = tx.objectStore(STORE).get(key);
    req.onsuccess = () => resolve(req.result === undefined ? lsGet(key) : req.result);
    req.onerror = () => reject(req.error);
  });
}

export async function kvSet(key, value) {
  const db = await openDb();
  if (!db) return lsSet(key, value);
  return new Promise((resolve, reject) => {
    const tx = db.transaction(STORE, "readwrite");
    tx.objectStore(STORE).put(value, key);
    tx.oncomplete = () => resolve();
    tx.onerror = () => reject(tx.error);
    tx.onabort = () => reject(tx.error);
  });
}

/** Read-modify-write in one IndexedDB transaction, so two ticks made at once cannot overwrite each other. */
export async function kvUpdate(key, fn) {
  const db = await openDb();
  if (!db) {
    const next = fn(lsGet(key));
    lsSet(key, next);
    return next;
  }
  return new Promise((resolve, reject) => {
    const tx = db.transaction(STORE, "readwrite");
    const os = tx.objectStore(STORE);
    const req = os.get(key);
    let next;
    req.onsuccess = () => {
      next = fn(req.result === undefined ? lsGet(key) : req.result);
      os.put(next, key);
    };
    tx.oncomplete = () => resolve(next);
    tx.onerror = () => reject(tx.error);
    tx.onabort = () => reject(tx.error);
  });
}

/** A random UUID v4; crypto.randomUUID exists only in secure contexts, getRandomValues everywhere. */
export function newClientId() {
  if (globalThis.crypto && typeof crypto.randomUUID === "function") return crypto.randomUUID();
  const b = new Uint8Array(16);
  crypto.getRandomValues(b);
  b[6] = (b[6] & 0x0f) | 0x40;
  b[8] = (b[8] & 0x3f) | 0x80;
  const h = [...b].map((x) => x.toString(16).padStart(2, "0")).join("");
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}
