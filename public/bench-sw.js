// The bench screen's offline worker. When the shop's network drops, a reload of a bench page
// must still bring the seat back with its queued strokes (those live in IndexedDB, see
// lib/bench/outbox.ts). This worker keeps exactly what that needs and nothing more:
//   - the HTML of bench pages this browser opened while signed in (network first),
//   - the seat's JSON (GET /api/seats/{id}, network first) so a reloaded screen shows the
//     server's last known strokes,
//   - the hashed build files and the audio worklet those pages ran (cache first for the hashed
//     files, which never change under one name; network first for the worklet, which can).
// Every other request passes straight to the network untouched. Pages and seat data are
// forgotten when anyone signs out or in, whenever the server says this browser is signed out,
// and after the length of a session (lib/auth/options.ts: 12 hours), so an offline reload only
// ever shows what this browser already loaded while signed in.

const PAGES = "grindfade-bench-pages-v1";
const ASSETS = "grindfade-bench-assets-v1";
const OURS = /^grindfade-bench-/;
const STORED_AT = "x-grindfade-stored-at";
const SESSION_MS = 12 * 60 * 60 * 1000;
/** A page still being fetched this long is given up for its offline copy. */
const PAGE_TIMEOUT_MS = 8000;
const MAX_PAGES = 48;
const MAX_ASSETS = 400;

const ID = "[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}";
const BENCH_PAGE = new RegExp(`^/bench/(${ID})$`, "i");
const SEAT_DATA = new RegExp(`^/api/seats/(${ID})$`, "i");
const SEAT_ID = new RegExp(`^${ID}$`, "i");
const HASHED = /^\/_next\/static\//;
const WORKLET = /^\/worklets\/[\w.-]+\.js$/;

self.addEventListener("install", (event) => {
  event.waitUntil(
    (async () => {
      // Where the browser can route requests itself (Chromium's static routing API), everything
      // this worker never handles goes straight to the network without waking it.
      if (typeof event.addRoutes === "function" && typeof URLPattern === "function") {
        const ours = ["/bench/*", "/api/seats/*", "/_next/static/*", "/worklets/*", "/sign-in", "/api/auth/*"];
        await event
          .addRoutes([{ condition: { not: { or: ours.map((pathname) => ({ urlPattern: new URLPattern({ pathname }) })) } }, source: "network" }])
          .catch(() => {});
      }
      await self.skipWaiting();
    })(),
  );
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    (async () => {
      const keep = new Set([PAGES, ASSETS]);
      for (const name of await caches.keys()) if (OURS.test(name) && !keep.has(name)) await caches.delete(name);
      await sweep();
      await self.clients.claim();
    })(),
  );
});

self.addEventListener("fetch", (event) => {
  const req = event.request;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin) return;
  const path = url.pathname;

  if (req.method !== "GET") {
    // Signing out, or anyone signing in on this browser: the old pages are no longer theirs.
    if (req.method === "POST" && (path === "/api/auth/signout" || path.startsWith("/api/auth/callback/"))) {
      event.waitUntil(forgetPages());
    }
    return;
  }
  if (req.mode === "navigate") {
    const seat = BENCH_PAGE.exec(path);
    if (seat) event.respondWith(benchPage(event, seat[1]));
    else if (path === "/sign-in") event.waitUntil(forgetPages());
    return;
  }
  // React Server Component fetches of a soft navigation are not pages; leave them alone.
  if (req.headers.has("rsc")) return;
  const seat = SEAT_DATA.exec(path);
  if (seat) return event.respondWith(seatData(event, seat[1]));
  if (HASHED.test(path)) return event.respondWith(hashedAsset(event));
  if (WORKLET.test(path)) return event.respondWith(worklet(event));
});

// The bench screen tells us which page it is and what it loaded, once it is up and again once
// it listens (the analysis worker and the worklet load only then).
self.addEventListener("message", (event) => {
  const data = event.data;
  // The screen's copy of a seat, brought up to date from its own stroke saves (it no longer reads
  // the seat after each stroke): kept in place of the last read, so an offline reload shows it.
  if (data && data.type === "seat" && typeof data.seatId === "string" && SEAT_ID.test(data.seatId) && typeof data.json === "string") {
    event.waitUntil(keepSeatCopy(data.seatId, data.json));
    return;
  }
  if (!data || data.type !== "keep" || typeof data.path !== "string") return;
  const seat = BENCH_PAGE.exec(data.path);
  if (!seat) return;
  const assets = Array.isArray(data.assets) ? data.assets.filter((a) => typeof a === "string").slice(0, 500) : [];
  event.waitUntil(keep(seat[1], assets));
});

const pageKey = (seatId) => new URL(`/bench/${seatId.toLowerCase()}`, self.location.origin).href;
const dataKey = (seatId) => new URL(`/api/seats/${seatId.toLowerCase()}`, self.location.origin).href;
const storedAt = (res) => Number(res.headers.get(STORED_AT)) || 0;

async function forgetPages() {
  await caches.delete(PAGES);
}

/** A copy of a response with the time it was kept; headers (the page's CSP among them) stay. */
async function store(key, res) {
  const headers = new Headers(res.headers);
  headers.set(STORED_AT, String(Date.now()));
  const copy = new Response(await res.blob(), { status: res.status, statusText: res.statusText, headers });
  const cache = await caches.open(PAGES);
  await cache.put(key, copy);
  const keys = await cache.keys();
  for (const old of keys.slice(0, Math.max(0, keys.length - MAX_PAGES))) await cache.delete(old);
}

/** A kept page or seat, if it is younger than a session; an older one is dropped. */
async function kept(key) {
  const cache = await caches.open(PAGES);
  const res = await cache.match(key, { ignoreVary: true, ignoreSearch: true });
  if (!res) return null;
  if (Date.now() - storedAt(res) > SESSION_MS) {
    await cache.delete(key);
    return null;
  }
  return res;
}

/** Drops every kept page and seat older than a session. */
async function sweep() {
  const cache = await caches.open(PAGES);
  for (const key of await cache.keys()) {
    const res = await cache.match(key);
    if (!res || Date.now() - storedAt(res) > SESSION_MS) await cache.delete(key);
  }
}

/**
 * Replaces the kept copy of a seat with the screen's own; only a seat this worker already keeps
 * (read while signed in, not forgotten since), and never larger than a seat read could be.
 */
async function keepSeatCopy(seatId, json) {
  if (json.length > 2_000_000) return;
  const cache = await caches.open(PAGES);
  const existing = await cache.match(dataKey(seatId), { ignoreVary: true, ignoreSearch: true });
  if (!existing) return;
  const headers = new Headers(existing.headers);
  headers.set(STORED_AT, String(Date.now()));
  await cache.put(dataKey(seatId), new Response(json, { status: 200, headers }));
}

async function forgetSeat(seatId) {
  const cache = await caches.open(PAGES);
  await Promise.all([cache.delete(pageKey(seatId)), cache.delete(dataKey(seatId))]);
}

function timeout(promise, ms) {
  return new Promise((resolve, reject) => {
    const t = setTimeout(() => reject(new Error("timed out")), ms);
    promise.then(
      (v) => (clearTimeout(t), resolve(v)),
      (e) => (clearTimeout(t), reject(e)),
    );
  });
}

const isHtml = (res) => (res.headers.get("content-type") || "").includes("text/html");

async function benchPage(event, seatId) {
  let res;
  try {
    res = await timeout(fetch(event.request), PAGE_TIMEOUT_MS);
  } catch {
    // No network (or none in time): the copy this browser kept while signed in, if any.
    return (await kept(pageKey(seatId))) || Response.error();
  }
  // A bench page only ever redirects to sign-in: this browser is signed out.
  if (res.type === "opaqueredirect" || res.redirected) event.waitUntil(forgetPages());
  else if (res.status === 200 && isHtml(res)) event.waitUntil(store(pageKey(seatId), res.clone()));
  else if (res.status === 404 || res.status === 403) event.waitUntil(forgetSeat(seatId));
  return res;
}

async function seatData(event, seatId) {
  let res;
  try {
    res = await fetch(event.request);
  } catch {
    // Offline: the seat as last read, but only if it is newer than the kept page (which carries
    // the seat as of its own load); otherwise the page's copy is the best there is.
    const [data, page] = await Promise.all([kept(dataKey(seatId)), kept(pageKey(seatId))]);
    return data && page && storedAt(data) >= storedAt(page) ? data : Response.error();
  }
  if (res.status === 401) event.waitUntil(forgetPages());
  else if (res.status === 200) event.waitUntil(store(dataKey(seatId), res.clone()));
  else if (res.status === 404 || res.status === 403) event.waitUntil(forgetSeat(seatId));
  return res;
}

/** Whether a request comes from a bench page or the analysis worker it started. */
async function fromBench(event) {
  const id = event.clientId || event.resultingClientId;
  const client = id ? await self.clients.get(id) : null;
  if (!client) return false;
  if (client.type === "worker") return true;
  return /^\/bench\//.test(new URL(client.url).pathname);
}

async function putAsset(req, res) {
  const cache = await caches.open(ASSETS);
  await cache.put(req, res);
  const keys = await cache.keys();
  for (const old of keys.slice(0, Math.max(0, keys.length - MAX_ASSETS))) await cache.delete(old);
}

/**
 * A kept response, answered as a new one. A response from the cache carries the URL it was first
 * fetched with, fragment and all, and a worker takes its own address from the response: the
 * bundler's worker entry (one file for every worker, told which chunks to load by its
 * "#params=" fragment) would otherwise start the first worker kept whichever worker asked.
 */
const fresh = (hit) => new Response(hit.body, { status: hit.status, statusText: hit.statusText, headers: hit.headers });

async function hashedAsset(event) {
  const hit = await caches.match(event.request, { cacheName: ASSETS, ignoreVary: true });
  if (hit) return fresh(hit);
  const res = await fetch(event.request);
  if (res.status === 200 && (await fromBench(event))) event.waitUntil(putAsset(event.request, res.clone()));
  return res;
}

async function worklet(event) {
  try {
    const res = await fetch(event.request);
    if (res.status === 200) event.waitUntil(putAsset(event.request, res.clone()));
    return res;
  } catch {
    return (await caches.match(event.request, { cacheName: ASSETS, ignoreVary: true })) || Response.error();
  }
}

const ASSET_REF = /\/_next\/static\/[^"'\s()\\<>]+/g;
const CSS_REF = /url\(\s*["']?([^"')\s]+)/g;

/**
 * Keeps a bench page the browser opened without us (a soft navigation, or before this worker
 * took over) and every build file it names or the page reports loading.
 */
async function keep(seatId, reported) {
  await sweep();
  const wanted = new Set();
  for (const a of reported) {
    try {
      const u = new URL(a, self.location.origin);
      if (u.origin === self.location.origin && (HASHED.test(u.pathname) || WORKLET.test(u.pathname))) wanted.add(u.pathname + u.search);
    } catch {
      /* not a URL */
    }
  }
  let page = await kept(pageKey(seatId));
  // A page loaded through this worker was kept a moment ago; only fetch one we did not see.
  if (!page || Date.now() - storedAt(page) > 60_000) {
    try {
      const res = await fetch(pageKey(seatId), { credentials: "same-origin", redirect: "manual", headers: { accept: "text/html" } });
      if (res.type === "opaqueredirect") return forgetPages();
      if (res.status !== 200 || !isHtml(res)) return;
      await store(pageKey(seatId), res);
      page = await kept(pageKey(seatId));
    } catch {
      /* offline: the copy kept earlier, if any, still names the files */
    }
  }
  if (page) for (const m of (await page.text()).matchAll(ASSET_REF)) wanted.add(m[0]);
  const cache = await caches.open(ASSETS);
  for (const path of wanted) {
    try {
      let hit = await cache.match(path, { ignoreVary: true });
      if (!hit) {
        const res = await fetch(path, { credentials: "same-origin" });
        if (res.status !== 200) continue;
        await putAsset(path, res.clone());
        hit = res;
      }
      // Fonts are named only inside the stylesheets.
      if (/\.css$/.test(path)) {
        for (const m of (await hit.text()).matchAll(CSS_REF)) {
          const u = new URL(m[1], new URL(path, self.location.origin));
          if (u.origin === self.location.origin && HASHED.test(u.pathname)) wanted.add(u.pathname);
        }
      }
    } catch {
      /* offline, or gone with a new build: the rest still counts */
    }
  }
}
