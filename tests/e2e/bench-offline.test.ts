// The bench screen through a shop network that keeps dropping, and a reload while it is down.
//
// How the network is cut, and why this way: Playwright's context.setOffline emulates offline for
// the page only; in Chromium it does not reach the service worker's own fetches (Playwright
// issue #2311, "context.setOffline does not work with service workers"). So the browser talks to
// the app through a TCP relay (`Line` below) that the test can cut: while cut, every open
// connection is reset and every new one is reset as it arrives, for the page, its service worker
// and its analysis worker alike. Cuts marked "offline" also call setOffline, so the page sees
// navigator.onLine false and the online/offline events, as a phone does when its Wi-Fi drops;
// cuts without it are a line that dies while the Wi-Fi stays up (only the outbox's timer
// notices the return).
//
// What this proves: strokes heard while cut are kept in IndexedDB and shown as waiting; a reload
// while cut is answered by the service worker with the bench page, whose queue and strokes are
// all still there; the microphone, worklet and analysis worker start again with no network; and
// once the line is back every stroke the page wrote to its outbox is on the server exactly once
// (by clientId, in its own session). What it does not prove: a radio that hangs instead of
// failing fast, other browsers' service worker lifecycles, or storage evicted by the phone.
import net from "node:net";
import os from "node:os";
import fs from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, inject, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { encodeWav } from "@/lib/audio/wav";
import { PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const SEAT = "4I2"; // no other browser test works this seat of MHW-0141
const tech = DEMO_USERS.find((u) => u.email.startsWith("ines"))!;

/** A TCP relay to the app server that can be cut and restored. */
class Line {
  private readonly open = new Set<net.Socket>();
  private up = true;
  /** Connections the browser tried while the line was cut. */
  refused = 0;

  private constructor(
    private readonly server: net.Server,
    readonly url: string,
  ) {}

  static async to(target: string): Promise<Line> {
    const { hostname, port } = new URL(target);
    let line: Line | undefined;
    const server = net.createServer((client) => {
      if (process.env.E2E_DEBUG) console.log(Date.now() % 100000, "connect", line!.up);
      if (!line!.up) {
        line!.refused++;
        client.resetAndDestroy();
        return;
      }
      const upstream = net.connect(Number(port), hostname);
      for (const s of [client, upstream]) {
        line!.open.add(s);
        s.on("close", () => line!.open.delete(s));
        s.on("error", () => {
          client.destroy();
          upstream.destroy();
        });
      }
      client.pipe(upstream).pipe(client);
    });
    await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
    const address = server.address() as net.AddressInfo;
    line = new Line(server, `http://127.0.0.1:${address.port}`);
    return line;
  }

  cut(): void {
    if (process.env.E2E_DEBUG) console.log(Date.now() % 100000, "cut", this.open.size);
    this.up = false;
    for (const s of this.open) s.resetAndDestroy();
  }

  restore(): void {
    this.up = true;
  }

  async close(): Promise<void> {
    this.cut();
    await new Promise((r) => this.server.close(r));
  }
}

/**
 * A long lapping recording that keeps producing strokes for about a minute without settling
 * (settling would stop the listening): quiet lead-in for calibration, 44 strokes fading slowly
 * from 14 dB toward 2 dB, then silence (Chromium repeats a %noloop file's last milliseconds).
 */
function longLapping(): string {
  const sampleRate = 48000;
  const session = synthesizeSession({
    sampleRate,
    seed: 41,
    leadInS: 3.5,
    tailS: 0.5,
    strokes: decayingContrasts(44, 14, 2, 30).map((c) => ({ contrastDb: c, durationS: 0.7, gapS: 0.55 })),
  });
  const all = new Float32Array(session.samples.length + sampleRate * 6);
  all.set(session.samples);
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-mic-")), "long-lapping.wav");
  fs.writeFileSync(file, encodeWav([all], sampleRate, { bitsPerSample: 16 }));
  return file;
}

// Test instrumentation, run in the page before the app: every stroke the bench screen writes to
// its IndexedDB outbox is also noted in localStorage (which survives the reload), so the test
// knows what the page produced without asking the page's own code.
const NOTE_STROKES = () => {
  const add = IDBObjectStore.prototype.add;
  IDBObjectStore.prototype.add = function (value: unknown, key?: IDBValidKey) {
    const req = add.call(this, value, key);
    const op = value as { kind?: string; sessionId?: string; stroke?: { clientId?: string } } | null;
    if (this.name === "ops" && op?.kind === "stroke") {
      req.addEventListener("success", () => {
        const list = JSON.parse(localStorage.getItem("e2e-strokes-written") ?? "[]") as unknown[];
        list.push({ clientId: op.stroke?.clientId, sessionId: op.sessionId, onLine: navigator.onLine });
        localStorage.setItem("e2e-strokes-written", JSON.stringify(list));
      });
    }
    return req;
  };
};

interface Written {
  clientId: string;
  sessionId: string;
  onLine: boolean;
}

const written = (page: Page) => page.evaluate(() => JSON.parse(localStorage.getItem("e2e-strokes-written") ?? "[]") as Written[]);

/** The outbox's stroke ops as stored in IndexedDB right now. */
const queued = (page: Page) =>
  page.evaluate(async () => {
    if (!(await indexedDB.databases()).some((d) => d.name === "grindfade-outbox")) return [] as string[];
    const db = await new Promise<IDBDatabase>((resolve, reject) => {
      const r = indexedDB.open("grindfade-outbox");
      r.onsuccess = () => resolve(r.result);
      r.onerror = () => reject(r.error);
    });
    const ops = await new Promise<Array<{ kind: string; stroke?: { clientId: string } }>>((resolve, reject) => {
      const r = db.transaction("ops").objectStore("ops").getAll();
      r.onsuccess = () => resolve(r.result);
      r.onerror = () => reject(r.error);
    });
    db.close();
    return ops.flatMap((o) => (o.kind === "stroke" && o.stroke ? [o.stroke.clientId] : []));
  });

const shownStrokes = async (page: Page) => Number(await page.getByTestId("stroke-count").innerText());

async function waitForWritten(page: Page, n: number, timeout = 30_000) {
  await page.waitForFunction((n) => (JSON.parse(localStorage.getItem("e2e-strokes-written") ?? "[]") as unknown[]).length >= n, n, {
    timeout,
  });
}

const allSaved = (page: Page, timeout = 30_000) =>
  page.waitForFunction(() => document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved"), null, {
    timeout,
  });

/**
 * Every stroke written so far is on the screen's own copy of the server's seat: nothing waits,
 * and the count shown (server strokes only, then) is all of them. The seat had none before.
 */
const screenCopyCurrent = (page: Page, timeout = 10_000) =>
  page.waitForFunction(
    () =>
      document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved") &&
      Number(document.querySelector("[data-testid=stroke-count]")?.textContent) ===
        (JSON.parse(localStorage.getItem("e2e-strokes-written") ?? "[]") as unknown[]).length,
    null,
    { timeout },
  );

interface SeatApi {
  seat: { code: string };
  stages: Record<"coarse" | "fine", { strokes: Array<{ clientId: string; sessionId: string }>; sessions: Array<{ id: string }> }>;
}

/** Read straight from the server (not through the line or the browser), as the same user. */
async function seatOnServer(context: BrowserContext, seatId: string): Promise<SeatApi> {
  const res = await context.request.get(`${baseURL}/api/seats/${seatId}`);
  expect(res.status()).toBe(200);
  return (await res.json()) as SeatApi;
}

let browser: Browser | null = null;
let line: Line | null = null;
afterEach(async () => {
  await browser?.close();
  browser = null;
  await line?.close();
  line = null;
});

async function openBench(micFile: string | null): Promise<{ context: BrowserContext; page: Page; seatId: string; benchURL: string }> {
  line = await Line.to(baseURL);
  browser = await launchBrowser(
    micFile
      ? ["--use-fake-device-for-media-stream", "--use-fake-ui-for-media-stream", `--use-file-for-fake-audio-capture=${micFile}%noloop`]
      : [],
  );
  const context = await browser.newContext({ ...PHONE, permissions: micFile ? ["microphone"] : [] });
  await context.addInitScript(NOTE_STROKES);
  const page = await signIn(context, line.url, tech.email, tech.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await context.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  await page.goto(`${line.url}/jobs/${jobs.find((j) => j.number === "MHW-0141")!.id}`);
  // E2E_DEBUG=1 prints the page's console and its requests, to follow a failing run.
  if (process.env.E2E_DEBUG) {
    page.on("console", (m) => console.log("console", m.text()));
    page.on("requestfailed", (r) => console.log(Date.now() % 100000, "failed", r.method(), r.url(), r.failure()?.errorText));
    page.on("requestfinished", (r) => console.log(Date.now() % 100000, "finished", r.method(), r.url()));
  }
  if (micFile) {
    // Into the bench the usual way, a tap on the job's seat list: a soft navigation, so the page
    // was not loaded through the offline worker, which must then fetch its own copy.
    await page.locator('a[href^="/bench/"]', { hasText: SEAT }).first().click();
    await page.waitForURL(/\/bench\//);
  } else {
    const href = await page.locator('a[href^="/bench/"]', { hasText: SEAT }).first().getAttribute("href");
    await page.goto(`${line.url}${href}`);
  }
  await page.getByTestId("start-listening").waitFor();
  const seatId = new URL(page.url()).pathname.split("/").pop()!;
  // The screen registers the offline worker, which takes over the open page and keeps a copy of
  // it (a moment after the first load; the cache name is the worker's, public/bench-sw.js).
  await page.waitForFunction(() => navigator.serviceWorker?.controller !== null, null, { timeout: 15_000 });
  await expect
    .poll(() => page.evaluate(async () => Boolean(await (await caches.open("grindfade-bench-pages-v1")).match(location.origin + location.pathname))), {
      timeout: 15_000,
    })
    .toBe(true);
  return { context, page, seatId, benchURL: `${line.url}/bench/${seatId}` };
}

describe("bench screen offline", () => {
  it("keeps every stroke through dropping networks and a reload while offline, and sends each once", { timeout: 240_000 }, async () => {
    const { context, page, seatId } = await openBench(longLapping());
    const l = line!;
    await page.getByTestId("start-listening").tap();
    await waitForWritten(page, 2);

    /** One drop: cut the line while strokes keep coming, check they wait, bring it back. */
    async function drop(kind: "offline" | "line-only", strokesWhileCut: number, during?: () => Promise<void>) {
      const before = (await written(page)).length;
      const refusedBefore = l.refused;
      if (kind === "offline") await context.setOffline(true);
      l.cut();
      await waitForWritten(page, before + strokesWhileCut);
      await during?.();
      const heardWhileCut = (await written(page)).slice(before);
      // Nothing heard while cut can have reached the server: all of it waits in IndexedDB.
      const inQueue = new Set(await queued(page));
      expect(heardWhileCut.filter((s) => !inQueue.has(s.clientId))).toEqual([]);
      expect(await page.getByTestId("sync-state").innerText()).toMatch(/Waiting to sync/);
      // With the Wi-Fi "up" the page kept trying the line, and the line refused it. (Offline, the
      // page does not try at all: Chromium fails its requests before they leave.)
      if (kind === "line-only") expect(l.refused).toBeGreaterThan(refusedBefore);
      l.restore();
      if (kind === "offline") await context.setOffline(false);
    }

    await drop("offline", 3);
    await waitForWritten(page, (await written(page)).length + 1);
    await allSaved(page);
    // Cut again as soon as the next stroke is heard, while its send may still be under way, and
    // then once more right after the line returns, before the queue has drained.
    await waitForWritten(page, (await written(page)).length + 1);
    await drop("line-only", 2);
    await new Promise((r) => setTimeout(r, 300));
    await drop("offline", 2);
    await allSaved(page, 20_000);

    // The reload: cut right after a stroke is saved and read back (so the screen's copy of the
    // seat is current), let three more strokes queue, and reload with no network at all.
    await waitForWritten(page, (await written(page)).length + 1);
    await screenCopyCurrent(page);
    let shownAtReload = 0;
    let queuedAtReload: string[] = [];
    await drop("offline", 3, async () => {
      shownAtReload = await shownStrokes(page);
      queuedAtReload = await queued(page);
      const reloaded = await page.reload();
      expect(reloaded?.fromServiceWorker()).toBe(true);
      expect(reloaded?.status()).toBe(200);
      expect(await page.getByTestId("seat-heading").innerText()).toContain(SEAT);
      // The queue survived: the same strokes wait in IndexedDB and the screen counts all of them.
      expect((await queued(page)).sort()).toEqual([...queuedAtReload].sort());
      await page.waitForFunction((n) => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) === n, shownAtReload, {
        timeout: 10_000,
      });
      // Besides the strokes: the recording the reload interrupted (kept in IndexedDB as it was
      // made) and its session's end, queued by the reloaded screen.
      expect(await page.getByTestId("sync-state").innerText()).toMatch(new RegExp(`Waiting to sync ${queuedAtReload.length + 2} item`));

      // Still offline: listen again. There is no network, so the worklet and the analysis worker
      // start from what this browser kept (the offline worker's cache, or failing that the HTTP
      // cache, which Chromium's worklet fetches do not report to Playwright), and the new
      // strokes queue too.
      expect(
        await page.evaluate(async () => Boolean(await caches.match("/worklets/grindfade-capture.js", { cacheName: "grindfade-bench-assets-v1" }))),
      ).toBe(true);
      const countBefore = (await written(page)).length;
      await page.getByTestId("start-listening").tap();
      await page.getByTestId("calibrating").waitFor({ timeout: 10_000 });
      await waitForWritten(page, countBefore + 3, 40_000);
      await expect.poll(async () => (await shownStrokes(page)) - ((await written(page)).length - countBefore)).toBe(shownAtReload);
    });
    await drop("line-only", 2);

    const cue = page.getByTestId("not-settling-cue");
    if (await cue.isVisible()) await cue.getByRole("button", { name: "Understood" }).tap();
    await page.getByRole("button", { name: "Stop listening" }).tap();
    await allSaved(page, 30_000);
    expect(await queued(page)).toEqual([]);

    // Every stroke the page wrote to its outbox is on the server once, in its own session.
    const mine = await written(page);
    expect(new Set(mine.map((s) => s.clientId)).size).toBe(mine.length);
    expect(mine.filter((s) => !s.onLine).length).toBeGreaterThanOrEqual(6);
    const sessionsWritten = new Set(mine.map((s) => s.sessionId));
    expect(sessionsWritten.size).toBe(2); // before and after the reload
    const server = await seatOnServer(context, seatId);
    const saved = [...server.stages.coarse.strokes, ...server.stages.fine.strokes];
    expect(saved).toHaveLength(mine.length);
    expect(new Set(saved.map((s) => s.clientId)).size).toBe(saved.length);
    expect(saved.map((s) => `${s.sessionId}/${s.clientId}`).sort()).toEqual(mine.map((s) => `${s.sessionId}/${s.clientId}`).sort());
    expect(server.stages.coarse.sessions.map((s) => s.id).sort()).toEqual([...sessionsWritten].sort());
    expect(await shownStrokes(page)).toBe(saved.length);
  });

  it("never shows a kept bench page offline once this browser is signed out", { timeout: 120_000 }, async () => {
    const { context, page, benchURL } = await openBench(null);
    const l = line!;
    /** Opens the bench page with the line cut: the kept copy, or the browser's network error. */
    const offlineReload = async () => {
      l.cut();
      try {
        return await page.goto(benchURL).then(
          (r) => ({ ok: true as const, fromServiceWorker: r?.fromServiceWorker() ?? false }),
          async (e: Error) => {
            // Let Chromium's error page finish loading, so the next navigation is not cut short by it.
            await page.waitForURL(/^chrome-error:/, { timeout: 5_000 });
            return { ok: false as const, error: e.message };
          },
        );
      } finally {
        l.restore();
      }
    };

    // Signed in: the kept page answers with no network.
    const kept = await offlineReload();
    expect(kept).toEqual({ ok: true, fromServiceWorker: true });
    await page.getByTestId("seat-heading").waitFor();

    // Signed out from the menu: the kept pages go with the session.
    await page.goto(`${l.url}/jobs`);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    const afterSignOut = await offlineReload();
    expect(afterSignOut.ok).toBe(false);

    // Signed in again and back on the bench, the page is kept again...
    await page.goto(`${l.url}/sign-in`);
    await page.getByLabel("E-mail").fill(tech.email);
    await page.getByLabel("Password").fill(tech.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    await page.goto(benchURL);
    await page.getByTestId("start-listening").waitFor();
    expect(await offlineReload()).toEqual({ ok: true, fromServiceWorker: true });

    // ...until the session is gone without a sign-out (it expired): the next visit is sent to
    // sign-in, and from then on nothing is shown offline either.
    await context.clearCookies();
    await page.goto(benchURL);
    await page.waitForURL(/\/sign-in/);
    expect((await offlineReload()).ok).toBe(false);
  });
});
