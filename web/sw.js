// Service worker: precaches every file of this build (list and hashes written by build.py),
// checks each file's SHA-256 before it is stored, and serves from the cache first. A new build
// installs into a new cache beside the old one; the old cache is deleted only on activation.
const VERSION = "@VERSION@";
const APP_VERSION = "@APP_VERSION@";
const ASSETS = /*@ASSETS@*/[];
const CACHE = `fieldphasor-${VERSION}`;
const scope = self.registration.scope;

async function sha256(buffer) {
  const d = await crypto.subtle.digest("SHA-256", buffer);
  return Array.from(new Uint8Array(d), (b) => b.toString(16).padStart(2, "0")).join("");
}

async function precache() {
  const cache = await caches.open(CACHE);
  const already = new Set((await cache.keys()).map((r) => r.url));
  let next = 0;
  async function lane() {
    while (next < ASSETS.length) {
      const [path, hash] = ASSETS[next++];
      const url = new URL(path, scope).href;
      if (already.has(url)) continue;
      const res = await fetch(url, { cache: "no-store" });
      if (!res.ok) throw new Error(`${path}: HTTP ${res.status}`);
      const body = await res.clone().arrayBuffer();
      if ((await sha256(body)) !== hash) throw new Error(`${path}: content does not match this build`);
      await cache.put(url, res);
    }
  }
  await Promise.all([lane(), lane(), lane(), lane()]);
}

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
    try {
      return await fetch(req);
    } catch (err) {
      // Offline and not part of the build: a page address still opens the app.
      if (req.mode === "navigate") return cache.match(new URL("index.html", scope).href);
      throw err;
    }
  })());
});
