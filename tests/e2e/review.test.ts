// Reviewing a recorded session end to end on a phone: a supervisor records a session for a demo
// seat through the API (as the bench would), opens the review page, sees one marked region per
// stroke over the waveform and one table row per stroke, and plays a stroke by tapping its row.
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { encodeWav } from "@/lib/audio/wav";
import { PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const ARTIFACTS = path.join(process.cwd(), "tests", ".artifacts");
fs.mkdirSync(ARTIFACTS, { recursive: true });
let browser: Browser;
let page: Page;
let jobId: string;
let seatId: string;
const sessionId = randomUUID();
// One phone for both sessions: a second phone would find the seat held by the first.
const deviceId = `review-e2e-${randomUUID()}`;
// Six strokes fading from 9 dB toward 0.5 dB; an invented session, as the demo data is.
const contrasts = decayingContrasts(6, 9, 0.5, 2);

beforeAll(async () => {
  browser = await launchBrowser(["--autoplay-policy=no-user-gesture-required"]);
  const context = await browser.newContext(PHONE);
  const supervisor = DEMO_USERS.find((u) => u.email === "rhea@millrace.example")!;
  page = await signIn(context, baseURL, supervisor.email, supervisor.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  jobId = jobs.find((j) => j.number === "MHW-0141")!.id;
  // The seat's id, as the job page's seat map links it.
  await page.goto(`${baseURL}/jobs/${jobId}`);
  seatId = (await page.getByTestId("seat-map").locator('a[aria-label^="Cylinder 2 exhaust 1,"]').getAttribute("data-seat-id"))!;
  expect(seatId).toMatch(/^[0-9a-f-]{36}$/);

  const sampleRate = 16000;
  const synth = synthesizeSession({
    sampleRate,
    seed: 7,
    leadInS: 1,
    tailS: 0.5,
    strokes: contrasts.map((c) => ({ contrastDb: c, durationS: 0.7, gapS: 0.55 })),
  });
  const started = await page.request.post(`${baseURL}/api/seats/${seatId}/sessions`, {
    headers: { origin: baseURL },
    data: { sessionId, stage: "coarse", deviceId, sampleRateHz: sampleRate, noiseFloorDb: -62 },
  });
  expect(started.status()).toBe(201);
  const saved = await page.request.post(`${baseURL}/api/sessions/${sessionId}/strokes`, {
    headers: { origin: baseURL },
    data: {
      strokes: synth.strokes.map((s, i) => ({
        clientId: randomUUID(),
        index: i + 1,
        startS: s.startS,
        endS: s.endS,
        onsetDb: -30 + s.contrastDb,
        bodyDb: -30,
        contrastDb: s.contrastDb,
        flags: [],
      })),
    },
  });
  expect(saved.status()).toBe(201);
  const uploaded = await page.request.put(`${baseURL}/api/sessions/${sessionId}/recording`, {
    headers: { "content-type": "audio/wav", origin: baseURL },
    data: Buffer.from(encodeWav([synth.samples], sampleRate)),
  });
  expect(uploaded.status()).toBe(201);
});
afterAll(async () => {
  await browser?.close();
});

describe("session review on a phone", () => {
  it("serves the recording in ranges for the player", async () => {
    const res = await page.request.get(`${baseURL}/api/sessions/${sessionId}/recording`, { headers: { range: "bytes=0-11" } });
    expect(res.status()).toBe(206);
    // Every WAV starts "RIFF", four bytes of length, then "WAVE" (the RIFF/WAVE header).
    expect((await res.body()).toString("latin1")).toMatch(/^RIFF.{4}WAVE$/s);
  });

  it("marks one region per stroke on the waveform and lists every stroke", async () => {
    await page.goto(`${baseURL}/review/${seatId}?session=${sessionId}`);
    const wave = page.getByTestId("waveform");
    await wave.waitFor();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="waveform"]')?.getAttribute("data-state") === "ready",
      undefined,
      { timeout: 30_000 },
    );
    expect(await wave.getAttribute("data-regions")).toBe(String(contrasts.length));
    expect(await page.getByTestId("stroke-table").locator("tbody tr").count()).toBe(contrasts.length);
    await page.getByTestId("review-fade-chart").waitFor();
    await page.screenshot({ path: path.join(ARTIFACTS, "review-phone.png"), fullPage: true });
    // Stacked for a phone: nothing scrolls sideways except inside the table's own box.
    expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
  });

  it("plays a stroke when its row is tapped, highlighting it", async () => {
    const review = page.getByTestId("session-review");
    await page.getByTestId("stroke-table").locator('tbody tr[data-stroke="3"]').click();
    await page.waitForFunction(
      () => document.querySelector('[data-testid="session-review"]')?.getAttribute("data-playing") === "stroke-3",
      undefined,
      { timeout: 5_000 },
    );
    expect(await review.getAttribute("data-active")).toBe("3");
    expect(await page.getByTestId("review-fade-chart").getAttribute("data-active")).toBe("3");
    await expect.poll(() => review.getAttribute("data-playing"), { timeout: 10_000 }).toBe("");
    expect(await page.getByTestId("review-message").count(), await page.getByTestId("review-message").allInnerTexts().then(String)).toBe(0);
  });

  it("highlights a stroke in the table and the curve when its region is hovered, and plays it on a tap", async () => {
    const review = page.getByTestId("session-review");
    // Regions live in wavesurfer's shadow root; Playwright's locators reach into it.
    const region = page.getByTestId("waveform").locator('[data-stroke="2"]');
    await region.hover();
    await expect.poll(() => review.getAttribute("data-active")).toBe("2");
    expect(await page.getByTestId("stroke-table").locator('tr[data-stroke="2"]').getAttribute("aria-selected")).toBe("true");
    expect(await page.getByTestId("review-fade-chart").getAttribute("data-active")).toBe("2");
    await region.click();
    await expect.poll(() => review.getAttribute("data-playing"), { timeout: 5_000 }).toBe("stroke-2");
    await expect.poll(() => review.getAttribute("data-playing"), { timeout: 10_000 }).toBe("");
  });

  it("plays the first stroke's start, then the last stroke's", async () => {
    const review = page.getByTestId("session-review");
    const seen = new Set<string>();
    await page.getByRole("button", { name: "Compare first and last" }).click();
    await expect
      .poll(
        async () => {
          seen.add((await review.getAttribute("data-playing")) ?? "");
          return seen.has("compare-last");
        },
        { timeout: 5_000, interval: 50 },
      )
      .toBe(true);
    expect(seen.has("compare-first")).toBe(true);
    expect(await review.getAttribute("data-active")).toBe(String(contrasts.length));
    await expect.poll(() => review.getAttribute("data-playing"), { timeout: 5_000 }).toBe("");
    expect(await page.getByTestId("review-message").count()).toBe(0);
  });

  it("says so for a session with no recording", async () => {
    const other = randomUUID();
    const started = await page.request.post(`${baseURL}/api/seats/${seatId}/sessions`, {
      headers: { origin: baseURL },
      data: { sessionId: other, stage: "fine", deviceId },
    });
    expect(started.status()).toBe(201);
    await page.goto(`${baseURL}/review/${seatId}?session=${other}`);
    await expect.poll(() => page.getByTestId("no-recording").innerText()).toMatch(/This session was not recorded/);
    expect(await page.getByTestId("waveform").count()).toBe(0);
  });

  it("attaches a photo of the contact ring from the camera input and shows it", async () => {
    await page.goto(`${baseURL}/review/${seatId}`);
    const photos = page.getByTestId("seat-photos");
    await photos.waitFor();
    await photos.getByText("No photos yet.").waitFor();
    // A 1×1 PNG: the smallest real image the server's byte check accepts.
    const png = Buffer.from("iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==", "base64");
    await photos.locator('input[type="file"]').setInputFiles({ name: "ring.png", mimeType: "image/png", buffer: png });
    await photos.getByTestId("photo-message").getByText("Photo saved.").waitFor({ timeout: 15_000 });
    // The list is drawn again from the server after the message shows.
    await expect.poll(() => photos.locator("img").count(), { timeout: 15_000 }).toBe(1);
    // Something that is not an image is refused with a message, whatever it claims to be.
    await photos.locator('input[type="file"]').setInputFiles({ name: "ring.png", mimeType: "image/png", buffer: Buffer.from("not an image at all") });
    await photos.getByTestId("photo-message").getByText(/Not saved/).waitFor({ timeout: 15_000 });
    expect(await photos.locator("img").count()).toBe(1);
  });

  it("prints a head report with the seat map, the seat verdicts and the sheets", async () => {
    await page.goto(`${baseURL}/jobs/${jobId}/report`);
    const report = page.getByTestId("head-report");
    await report.waitFor();
    const map = report.getByTestId("seat-map");
    // The demo job's head: four cylinders, two intake and two exhaust seats each (db/seed.ts).
    expect(await map.locator("a[data-seat-id]").count()).toBe(16);
    // On the report, seats lead to their review rather than to the bench.
    expect(await map.locator(`a[data-seat-id="${seatId}"]`).getAttribute("href")).toBe(`/review/${seatId}`);
    expect(await report.getByTestId("report-seats").locator("tbody tr").count()).toBe(16);
    // The seat lapped above: its coarse stage shows the six strokes sent.
    const row = report.getByTestId("report-seats").locator("tbody tr", { has: page.locator(`a[href="/review/${seatId}"]`) });
    expect(await row.innerText()).toMatch(new RegExp(`${contrasts.length} strokes`));
    // Two camshafts × five journals on the demo head.
    expect(await report.getByTestId("report-clearance").locator("tbody tr").count()).toBe(10);
    expect(await report.getByText("Cautions", { exact: true }).count()).toBe(1);
    // The photo attached above, once (other browser tests may attach photos to seats of their own).
    expect(await report.getByTestId("report-photos").locator('img[alt="Seat 2E1 contact ring"]').count()).toBe(1);
    await report.getByRole("heading", { name: "Sign-offs" }).waitFor();
    await page.screenshot({ path: path.join(ARTIFACTS, "head-report-phone.png"), fullPage: true });
    await page.emulateMedia({ media: "print" });
    // Paper carries no shell and no buttons.
    expect(await page.getByTestId("print-button").isVisible()).toBe(false);
    expect(await page.locator("body > div > header").first().isVisible()).toBe(false);
    await page.screenshot({ path: path.join(ARTIFACTS, "head-report-print.png"), fullPage: true });
    await page.emulateMedia({ media: "screen" });
  });
});
