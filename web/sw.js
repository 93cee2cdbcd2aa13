// Service worker: precaches every file of this build (list and hashes written by build.py),
// checks each file's SHA-256 before it is stored, and serves from the cache first. A new build
// installs into a new cache beside the old one; the old cache is deleted only on activation.
// ON_DEMAND files (the micropip install path's) are not precached: the first request for one
// fetches it, checks its SHA-256 the same way and keeps it, so that path works offline afterwards.
// Hashes are of the decoded bytes: a server may send any file gzipped (Content-Encoding).
const VERSION = "@VERSION@";
const APP_VERSION = "@APP_VERSION@";
const ASSETS = /*@ASSETS@*/[];
const ON_DEMAND = /*@ON_DEMAND@*/[];
const CACHE = `fieldphasor-${VERSION}`;
const scope = self.registration.scope;

async function sha256(buffer) {
  const d = await crypto.subtle.digest("SHA-256", buffer);
  return Array.from(new Uint8Array(d), (b) => b.toString(16).padStart(2, "0")).join("");
}

// Fetch one file of this build and store it once its decoded bytes match the build's hash.
// First with "no-cache" (revalidated: on a first visit the page and the engine have just
// downloaded most files, so the server answers 304 and the HTTP cache supplies the body, which
// is then hashed like any other); if that copy does not match, once more straight from the server.
async function fetchChecked(cache, path, hash) {
  const url = new URL(path, scope).href;
  for (const mode of ["no-cache", "no-store"]) {
    const res = await fetch(url, { cache: mode });
    if (!res.ok) throw new Error(`${path}: HTTP ${res.status}`);
    const body = await res.clone().arrayBuffer();
    if ((await sha256(body)) === hash) return cache.put(url, res);
  }
  throw new Error(`${path}: content does not match this build`);
}

async function precache() {
  const cache = await caches.open(CACHE);
  const already = new Set((await cache.keys()).map((r) => r.url));
  let next = 0;
  async function lane() {
    while (next < ASSETS.length) {
      const [path, hash] = ASSETS[next++];
      if (!already.has(new URL(path, scope).href)) await fetchChecked(cache, path, hash);
    }
  }
  await Promise.all([lane(), lane(), lane(), lane()]);
}

const onDemand = new Map(ON_DEMAND.map(([path, hash]) => [new URL(path, scope).href, [path, hash]]));

self.addEventListener("install", (event) => {
  event.waitUntil(precache());
});

self.addEventListener("activate", (event) => {
  event.waitUntil((async () => {
    for (const key of await caches.keys()) {
      if (key.startsWith("fieldphasor-") && key !== CACHE) await caches.delete(key);
    }
    await self.clients.claim();
  })());
});

self.addEventListener("message", (event) => {
  if (event.data === "skip-waiting") self.skipWaiting();
  if (event.data === "version" && event.source) event.source.postMessage({ type: "version", version: VERSION, app: APP_VERSION });
});

self.addEventListener("fetch", (event) => {
  const req = event.request;
  if (req.method !== "GET") return;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin) return;
  event.respondWith((async () => {
    const cache = await caches.open(CACHE);
    const key = url.origin + url.pathname;
    // The cached response itself (not a copy), so Chromium can reuse compiled wasm kept beside it.
    const hit = await cache.match(key === scope ? new URL("index.html", scope).href : key);
    if (hit) return hit;
    const lazy = onDemand.get(key);
    if (lazy) {
      await fetchChecked(cache, ...lazy);
      return cache.match(key);
    }
    try {
      return await fetch(req);
    } catch (err) {
      // Offline and not part of the build: a page address still opens the app.
      if (req.mode === "navigate") return cache.match(new URL("index.html", scope).href);
      throw err;
    }
  })());
});
