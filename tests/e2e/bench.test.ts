// The bench screen end to end: Debian's Chromium at a phone viewport listens to a fake
// microphone playing the synthesizer's recordings, and the server keeps every stroke.
import fs from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, inject, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { busyBaySession, decayingSession, flatHighSession, type FakeMicFile } from "./bench-audio";
import { PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const ARTIFACTS = path.join(process.cwd(), "tests", ".artifacts");
fs.mkdirSync(ARTIFACTS, { recursive: true });

let browser: Browser | null = null;
afterEach(async () => {
  await browser?.close();
  browser = null;
});

interface SeatApi {
  seat: { state: string; code: string };
  stages: Record<
    "coarse" | "fine",
    { strokes: Array<{ clientId: string; startS: number; sessionId: string; contrastDb: number; flags: string[] }>; verdict: { state: string; judgedStrokes: number } }
  >;
}

async function openSeat(mic: FakeMicFile, jobNumber: string, seatCode: string, who = "ines"): Promise<{ context: BrowserContext; page: Page; seatId: string }> {
  browser = await launchBrowser([
    "--use-fake-device-for-media-stream",
    "--use-fake-ui-for-media-stream",
    `--use-file-for-fake-audio-capture=${mic.path}%noloop`,
    "--autoplay-policy=no-user-gesture-required",
  ]);
  const context = await browser.newContext({ ...PHONE, permissions: ["microphone"] });
  const tech = DEMO_USERS.find((u) => u.email.startsWith(who))!;
  const page = await signIn(context, baseURL, tech.email, tech.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  const job = jobs.find((j) => j.number === jobNumber)!;
  await page.goto(`${baseURL}/jobs/${job.id}`);
  await page.locator('a[href^="/bench/"]', { hasText: seatCode }).first().click();
  await page.waitForURL(/\/bench\//);
  await page.getByTestId("start-listening").waitFor();
  const seatId = new URL(page.url()).pathname.split("/").pop()!;
  return { context, page, seatId };
}

async function seatFromServer(page: Page, seatId: string): Promise<SeatApi> {
  const res = await page.request.get(`${baseURL}/api/seats/${seatId}`);
  expect(res.status()).toBe(200);
  return (await res.json()) as SeatApi;
}

const strokeCount = async (page: Page) => Number(await page.getByTestId("stroke-count").innerText());

describe("bench screen with a fake microphone", () => {
  it("calibrates, shows strokes live, settles, and keeps it all after a reload", async () => {
    const mic = decayingSession();
    const { page, seatId } = await openSeat(mic, "MHW-0141", "3I1");
    expect(await page.getByTestId("seat-heading").innerText()).toContain("3I1");
    await page.getByTestId("start-listening").tap();
    await page.getByTestId("calibrating").waitFor({ timeout: 10_000 });
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-calibrating.png") });

    // Strokes arrive one by one while the recording plays.
    await page.waitForFunction(() => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) >= 3, null, { timeout: 30_000 });
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-listening.png") });
    const chartPoints = Number(await page.getByTestId("fade-chart").getAttribute("data-strokes"));
    expect(chartPoints).toBeGreaterThanOrEqual(3);

    await page.getByTestId("settled-cue").waitFor({ timeout: 45_000 });
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-settled.png") });
    const seen = await strokeCount(page);
    // The recording's contrasts fall below 1.5 dB from its 7th stroke; four in a row, flat, is the earliest settle.
    const firstLow = mic.contrastsDb.findIndex((c) => c <= 1.5);
    expect(seen).toBeGreaterThanOrEqual(firstLow + 4);
    expect(seen).toBeLessThanOrEqual(firstLow + 7);
    await page.getByTestId("settled-cue").getByRole("button", { name: "OK", exact: true }).tap();

    // The server's verdict is the one that counts, and it is already there.
    await page.waitForFunction(() => document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved"), null, { timeout: 20_000 });
    const server = await seatFromServer(page, seatId);
    expect(server.stages.coarse.verdict.state).toBe("settled");
    expect(server.stages.coarse.strokes).toHaveLength(seen);

    await page.reload();
    await page.getByTestId("stroke-count").waitFor();
    expect(await strokeCount(page)).toBe(seen);
    expect(await page.getByTestId("verdict").innerText()).toBe("Settled");
    // Coarse settled: the big button now listens with fine compound.
    expect(await page.getByTestId("start-listening").innerText()).toBe("Listen — fine compound");
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-after-reload.png") });
  });

  it("loses no stroke and duplicates none across a dropped network", async () => {
    const mic = decayingSession();
    const { context, page, seatId } = await openSeat(mic, "MHW-0141", "3E1");
    await page.getByTestId("start-listening").tap();
    await page.waitForFunction(() => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) >= 2, null, { timeout: 30_000 });
    await context.setOffline(true);
    const atDrop = await strokeCount(page);
    await page.waitForFunction((n) => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) >= n + 3, atDrop, { timeout: 30_000 });
    expect(await page.getByTestId("sync-state").innerText()).toMatch(/Waiting to sync/);
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-offline.png") });
    await context.setOffline(false);
    await page.getByTestId("settled-cue").waitFor({ timeout: 45_000 });
    await page.getByTestId("settled-cue").getByRole("button", { name: "OK", exact: true }).tap();
    await page.waitForFunction(() => document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved"), null, { timeout: 30_000 });
    const seen = await strokeCount(page);
    const server = await seatFromServer(page, seatId);
    const saved = server.stages.coarse.strokes;
    expect(saved).toHaveLength(seen);
    expect(new Set(saved.map((s) => s.clientId)).size).toBe(saved.length);
    expect(new Set(saved.map((s) => s.startS.toFixed(3))).size).toBe(saved.length);
    expect(server.stages.coarse.verdict.state).toBe("settled");
  });

  it("a curve that flattens high ends in not settling, with what to do next", async () => {
    const mic = flatHighSession();
    const { page, seatId } = await openSeat(mic, "MHW-0141", "4I1");
    await page.getByTestId("start-listening").tap();
    await page.getByTestId("not-settling-cue").waitFor({ timeout: 60_000 });
    expect(await page.getByTestId("not-settling-cue").innerText()).toMatch(/recutting/i);
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-not-settling.png") });
    await page.getByRole("button", { name: "Understood" }).tap();
    await page.getByRole("button", { name: "Stop listening" }).tap();
    await page.waitForFunction(() => document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved"), null, { timeout: 30_000 });
    const server = await seatFromServer(page, seatId);
    expect(server.stages.coarse.verdict.state).toBe("not-settling");
    expect(server.seat.state).toBe("stalled");
    expect(server.stages.coarse.strokes.length).toBeGreaterThanOrEqual(12);
  });

  it("measures the room again when lapping began during it, and draws a rattled stroke hollow, left out with its reason", async () => {
    const mic = busyBaySession();
    const { page, seatId } = await openSeat(mic, "MHW-0142", "2I1", "dov");
    await page.getByTestId("start-listening").tap();
    // The long stroke over "stay quiet" is heard: the screen says so and measures again.
    await page.getByText(/Something was heard — stay quiet, measuring the room again/).waitFor({ timeout: 15_000 });
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-calibration-disturbed.png") });
    const real = mic.contrastsDb.length;
    await page.waitForFunction((n) => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) >= n, real, { timeout: 60_000 });
    await page.waitForFunction(() => Number(document.querySelector("[data-testid=fade-chart]")?.getAttribute("data-left-out")) >= 1, null, { timeout: 10_000 });
    expect(await page.getByTestId("left-out").innerText()).toMatch(/1 stroke left out: a knock or rattle over the stroke/);
    await page.getByRole("button", { name: /a knock or rattle over the stroke/ }).tap();
    expect(await page.getByTestId("picked-stroke").innerText()).toMatch(/left out: a knock or rattle over the stroke/);
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-left-out.png") });
    await page.getByRole("button", { name: "Stop listening" }).tap();
    await page.waitForFunction(() => document.querySelector("[data-testid=sync-state]")?.textContent?.includes("All strokes saved"), null, { timeout: 30_000 });

    const server = await seatFromServer(page, seatId);
    const saved = server.stages.coarse.strokes;
    // The stroke under the room measurement never enters the curve as a judged point: either
    // it is not there at all, or it is left out because its start was not heard.
    const judged = saved.filter((st) => st.flags.length === 0);
    expect(saved.filter((st) => st.flags.length > 0 && !st.flags.includes("start-not-heard") && !st.flags.includes("impulsive"))).toEqual([]);
    expect(judged.length).toBe(real - 1);
    expect(Math.abs(judged[0]!.contrastDb - mic.contrastsDb[0]!)).toBeLessThan(1.5);
    expect(saved.filter((st) => st.flags.includes("impulsive"))).toHaveLength(1);
    expect(server.stages.coarse.verdict.judgedStrokes).toBe(real - 1);
  });

  it("explains a refused microphone instead of showing a blank screen", async () => {
    browser = await launchBrowser(["--use-fake-device-for-media-stream"]);
    const context = await browser.newContext({ ...PHONE });
    const tech = DEMO_USERS.find((u) => u.email.startsWith("ines"))!;
    const page = await signIn(context, baseURL, tech.email, tech.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
    await page.goto(`${baseURL}/jobs/${jobs.find((j) => j.number === "MHW-0141")!.id}`);
    await page.locator('a[href^="/bench/"]', { hasText: "4E2" }).first().click();
    await page.getByTestId("start-listening").waitFor();
    // No permission was granted to this context and no prompt UI is faked: the request is denied.
    await page.getByTestId("start-listening").tap();
    const error = page.getByTestId("listen-error");
    await error.waitFor({ timeout: 15_000 });
    expect(await error.innerText()).toMatch(/microphone/i);
    expect(await page.getByTestId("start-listening").innerText()).toMatch(/try again/i);

    // Turned sideways on the bench: still no sideways scrolling, seat and button on screen.
    await page.setViewportSize({ width: 844, height: 390 });
    expect(await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
    expect(await page.getByTestId("seat-heading").isVisible()).toBe(true);
    const button = await page.getByTestId("start-listening").boundingBox();
    expect(button!.height).toBeGreaterThanOrEqual(48); // a gloved thumb needs a large target (common practice: ≥ 48 px)
    await page.screenshot({ path: path.join(ARTIFACTS, "bench-landscape.png") });
  });
});
