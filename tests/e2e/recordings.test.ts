// Every phone's recordings, end to end in Debian's Chromium at a phone's size (390 × 844), on
// MHW-0142's seats 4I1, 4I2, 4E1 and 4E2 (Dov's bay):
// - a WebKit-style MP4 (AAC in a fragmented MP4, as Safari's MediaRecorder writes it; made here
//   by Debian's ffmpeg) picked with "Use a recording", uploaded with progress shown, and played
//   back by a supervisor in listen-back;
// - "Use a recording" with a WAV and with an m4a (ffmpeg's AAC) of the same lapping sound the
//   fake microphone plays to the live bench screen: the strokes saved and the verdict agree;
// - a reload in the middle of listening keeps what was recorded (IndexedDB) and uploads it.
import fs from "node:fs";
import path from "node:path";
import { afterEach, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { encodeWith } from "../storage/encoded";
import { decayingSession, type FakeMicFile } from "./bench-audio";
import { PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const ARTIFACTS = path.join(process.cwd(), "tests", ".artifacts");
fs.mkdirSync(ARTIFACTS, { recursive: true });
const JOB = "MHW-0142";

let browser: Browser | null = null;
afterEach(async () => {
  await browser?.close();
  browser = null;
});

interface SeatApi {
  seat: { state: string; code: string };
  stages: Record<
    "coarse" | "fine",
    {
      strokes: Array<{
        clientId: string;
        startS: number;
        endS: number;
        sessionId: string;
        contrastDb: number;
        flags: string[];
      }>;
      sessions: Array<{ id: string; endedAt: string | null; hasRecording: boolean }>;
      verdict: { state: string; judgedStrokes: number; settled?: { atStroke: number } | null };
    }
  >;
}

let mic: FakeMicFile;
beforeAll(() => {
  // The lapping sound every test here uses: contrasts fading from 12 dB to 0.3 dB, settling.
  mic = decayingSession();
});

async function phone(
  micFile: FakeMicFile | null,
  who: string,
): Promise<{ context: BrowserContext; page: Page }> {
  browser = await launchBrowser([
    "--autoplay-policy=no-user-gesture-required",
    ...(micFile
      ? [
          "--use-fake-device-for-media-stream",
          "--use-fake-ui-for-media-stream",
          `--use-file-for-fake-audio-capture=${micFile.path}%noloop`,
        ]
      : []),
  ]);
  const context = await browser.newContext({
    ...PHONE,
    permissions: micFile ? ["microphone"] : [],
  });
  context.on("console", (m) => {
    if (m.type() === "error") console.log(`[browser] ${m.text()}`);
  });
  const user = DEMO_USERS.find((u) => u.email.startsWith(who))!;
  const page = await signIn(context, baseURL, user.email, user.password);
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
  return { context, page };
}

/** The seat's bench screen, reached from the job page as a technician does; returns its id. */
async function openBench(page: Page, seatCode: string, stage?: "coarse" | "fine"): Promise<string> {
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as {
    jobs: Array<{ id: string; number: string }>;
  };
  await page.goto(`${baseURL}/jobs/${jobs.find((j) => j.number === JOB)!.id}`);
  const href = await page
    .locator('a[href^="/bench/"]', { hasText: seatCode })
    .first()
    .getAttribute("href");
  const seatId = href!.split("/").pop()!.split("?")[0]!;
  await page.goto(`${baseURL}/bench/${seatId}${stage ? `?stage=${stage}` : ""}`);
  await page.getByTestId("start-listening").waitFor();
  return seatId;
}

async function seatFromServer(page: Page, seatId: string): Promise<SeatApi> {
  const res = await page.request.get(`${baseURL}/api/seats/${seatId}`);
  expect(res.status()).toBe(200);
  return (await res.json()) as SeatApi;
}

const allSaved = (page: Page) =>
  page.waitForFunction(
    () =>
      document
        .querySelector("[data-testid=sync-state]")
        ?.textContent?.includes("All strokes saved"),
    null,
    { timeout: 60_000 },
  );

/** Picks `file` with "Use a recording", checks what it found and saves it; returns the strokes it said it found. */
async function useRecording(page: Page, file: string): Promise<{ found: number; verdict: string }> {
  const panel = page.getByTestId("use-recording");
  await panel.getByTestId("use-recording-file").setInputFiles(file);
  await panel
    .getByTestId("use-recording-found")
    .or(panel.getByTestId("use-recording-error"))
    .waitFor({ timeout: 60_000 })
    .catch(async (err: Error) => {
      throw new Error(`${err.message}\nThe panel said: ${await panel.innerText()}`);
    });
  expect(await panel.getByTestId("use-recording-error").count(), await panel.innerText()).toBe(0);
  const found = Number(await panel.getByTestId("use-recording-strokes").innerText());
  const verdict = await panel.getByTestId("use-recording-verdict").innerText();
  await page.screenshot({
    path: path.join(ARTIFACTS, `use-recording-${path.extname(file).slice(1)}.png`),
  });
  await panel.getByTestId("use-recording-save").tap();
  await panel.getByTestId("use-recording-saved").waitFor({ timeout: 15_000 });
  await allSaved(page);
  return { found, verdict };
}

/** The only session of the stage, once the server has its recording. */
async function recordedSession(page: Page, seatId: string, stage: "coarse" | "fine" = "coarse") {
  await expect
    .poll(
      async () =>
        (await seatFromServer(page, seatId)).stages[stage].sessions.filter((s) => s.hasRecording)
          .length,
      { timeout: 60_000 },
    )
    .toBe(1);
  return (await seatFromServer(page, seatId)).stages[stage].sessions.find((s) => s.hasRecording)!;
}

describe("every phone's recordings", () => {
  it("a WebKit-style MP4 recording goes up with its progress shown and plays in listen-back", async () => {
    const mp4 = encodeWith("webkit-mp4", mic.path);
    // The fragmented MP4 Safari writes: an "ftyp" box naming the ISO brands, then an empty "moov" and fragments.
    expect(fs.readFileSync(mp4).subarray(4, 12).toString("latin1")).toBe("ftypiso5");
    expect(fs.readFileSync(mp4).includes(Buffer.from("moof"))).toBe(true);

    const { page } = await phone(null, "dov");
    const seatId = await openBench(page, "4I1");
    const uploadStates = page.evaluate(
      () =>
        new Promise<string[]>((resolve) => {
          const seen: string[] = [];
          const watch = new MutationObserver(() => {
            const el = document.querySelector("[data-testid=recording-upload]");
            if (!el) return;
            seen.push(`${el.getAttribute("data-state")} ${el.getAttribute("data-percent")}`);
            if (el.getAttribute("data-state") === "done") {
              watch.disconnect();
              resolve(seen);
            }
          });
          watch.observe(document.body, { subtree: true, childList: true, attributes: true });
        }),
    );
    const { found, verdict } = await useRecording(page, mp4);
    expect(found).toBeGreaterThanOrEqual(5);
    expect(verdict).toBe("settled");
    const states = await uploadStates;
    expect(states.at(-1)).toBe("done 100");
    expect(states[0]).toMatch(/^sending \d+$/);
    await page.getByTestId("recording-upload").getByText("Recording uploaded").waitFor();

    const session = await recordedSession(page, seatId);
    const served = await page.request.get(`${baseURL}/api/sessions/${session.id}/recording`, {
      headers: { range: "bytes=0-11" },
    });
    expect(served.status()).toBe(206);
    expect(served.headers()["content-type"]).toBe("audio/mp4");
    expect((await served.body()).toString("latin1")).toBe(
      fs.readFileSync(mp4).subarray(0, 12).toString("latin1"),
    );
    await expect
      .poll(
        async () =>
          (await seatFromServer(page, seatId)).stages.coarse.strokes.filter(
            (s) => s.sessionId === session.id,
          ).length,
      )
      .toBe(found);
    await browser!.close();

    // The supervisor listens back on a phone.
    const sup = await phone(null, "rhea");
    await sup.page.goto(`${baseURL}/review/${seatId}?session=${session.id}`);
    await sup.page.waitForFunction(
      () =>
        document.querySelector('[data-testid="waveform"]')?.getAttribute("data-state") === "ready",
      undefined,
      {
        timeout: 30_000,
      },
    );
    expect(await sup.page.getByTestId("waveform").getAttribute("data-regions")).toBe(String(found));
    const review = sup.page.getByTestId("session-review");
    await sup.page.getByTestId("stroke-table").locator('tbody tr[data-stroke="2"]').tap();
    await expect
      .poll(() => review.getAttribute("data-playing"), { timeout: 5_000 })
      .toBe("stroke-2");
    // The player really moves through the AAC: the waveform's progress passes the stroke's start.
    await expect.poll(() => review.getAttribute("data-playing"), { timeout: 10_000 }).toBe("");
    expect(await sup.page.getByTestId("review-message").count()).toBe(0);
    await sup.page.screenshot({
      path: path.join(ARTIFACTS, "listen-back-mp4-phone.png"),
      fullPage: true,
    });
  }, 180_000);

  it("a WAV and an m4a of the same sound give the strokes and verdict of listening live", async () => {
    const m4a = encodeWith("m4a", mic.path);
    expect(fs.readFileSync(m4a).subarray(4, 12).toString("latin1")).toBe("ftypM4A ");

    // Live: the fake microphone plays the sound to the bench screen of 4E2.
    const { page } = await phone(mic, "dov");
    const liveSeat = await openBench(page, "4E2");
    await page.getByTestId("start-listening").tap();
    await page.getByTestId("settled-cue").waitFor({ timeout: 60_000 });
    await page.getByTestId("settled-cue").getByRole("button", { name: "OK", exact: true }).tap();
    await allSaved(page);
    const live = (await seatFromServer(page, liveSeat)).stages.coarse;

    // The same sound as files, on 4I2 (WAV) and 4E1 (m4a).
    const wavSeat = await openBench(page, "4I2");
    const wavUse = await useRecording(page, mic.path);
    const m4aSeat = await openBench(page, "4E1");
    const m4aUse = await useRecording(page, m4a);
    // Sent from the outbox in the background: read once the server has them all.
    for (const [seatId, use] of [
      [wavSeat, wavUse],
      [m4aSeat, m4aUse],
    ] as const) {
      await expect
        .poll(async () => (await seatFromServer(page, seatId)).stages.coarse.strokes.length, {
          timeout: 30_000,
        })
        .toBe(use.found);
    }
    const wav = (await seatFromServer(page, wavSeat)).stages.coarse;
    const aac = (await seatFromServer(page, m4aSeat)).stages.coarse;

    for (const [name, stage, use] of [
      ["wav", wav, wavUse],
      ["m4a", aac, m4aUse],
    ] as const) {
      expect(stage.strokes, name).toHaveLength(use.found);
      expect(stage.verdict.state, name).toBe(live.verdict.state);
      expect(use.verdict, name).toBe("settled");
      const counts = `${name}: ${stage.strokes.length} strokes settled at ${stage.verdict.settled?.atStroke}; live ${live.strokes.length} settled at ${live.verdict.settled?.atStroke}; contrasts ${stage.strokes.map((x) => x.contrastDb.toFixed(2)).join(" ")} / live ${live.strokes.map((x) => x.contrastDb.toFixed(2)).join(" ")}`;
      // Settled at the same stroke, give or take one whose contrast sits at the threshold; AAC
      // moves the high band's contrasts by up to about 0.8 dB, which can move it by two.
      const slack = name === "wav" ? 1 : 2;
      expect(
        Math.abs(stage.verdict.settled!.atStroke - live.verdict.settled!.atStroke),
        counts,
      ).toBeLessThanOrEqual(slack);
      // Live stops at the settling stroke and may also save the one sounding as it stops.
      expect(stage.strokes.length - live.strokes.length, counts).toBeLessThanOrEqual(slack);
      expect(live.strokes.length - stage.strokes.length, counts).toBeLessThanOrEqual(slack + 1);
      const n = Math.min(stage.strokes.length, live.strokes.length);
      // The live timeline starts when the microphone does, a moment after or before the file's.
      const shift = stage.strokes[0]!.startS - live.strokes[0]!.startS;
      expect(Math.abs(shift), name).toBeLessThan(1);
      for (let i = 0; i < n; i++) {
        // The same strokes, equally spaced in time (to a few analysis hops: the microphone
        // delivers blocks late and early), with contrasts within 1 dB (the microphone
        // path resamples and buffers the sound; AAC drops some of the highest band).
        expect(
          Math.abs(stage.strokes[i]!.startS - live.strokes[i]!.startS - shift),
          `${name} stroke ${i + 1} start`,
        ).toBeLessThan(0.06);
        expect(
          Math.abs(stage.strokes[i]!.contrastDb - live.strokes[i]!.contrastDb),
          `${name} stroke ${i + 1} contrast`,
        ).toBeLessThan(1);
        expect(stage.strokes[i]!.flags, `${name} stroke ${i + 1} flags`).toEqual(
          live.strokes[i]!.flags,
        );
      }
    }
    // Each file is kept as its session's recording, under the type its bytes say.
    for (const [seatId, type] of [
      [wavSeat, "audio/wav"],
      [m4aSeat, "audio/mp4"],
    ] as const) {
      const session = await recordedSession(page, seatId);
      const res = await page.request.get(`${baseURL}/api/sessions/${session.id}/recording`, {
        headers: { range: "bytes=0-3" },
      });
      expect(res.headers()["content-type"]).toBe(type);
    }
  }, 240_000);

  it("refuses a file that is not a recording, and one that will not decode, saying what to do", async () => {
    const { page } = await phone(null, "dov");
    await openBench(page, "4E1", "fine");
    const panel = page.getByTestId("use-recording");
    const png = Buffer.from(
      "iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==",
      "base64",
    );
    await panel
      .getByTestId("use-recording-file")
      .setInputFiles({ name: "memo.m4a", mimeType: "audio/mp4", buffer: png });
    expect(await panel.getByTestId("use-recording-error").innerText()).toMatch(
      /“memo\.m4a” is a photo\. Pick the m4a, MP3, Ogg or WAV file/,
    );
    // An M4A cut short after its first kilobytes: the right bytes at the start, nothing playable.
    const cut = fs.readFileSync(encodeWith("m4a", mic.path)).subarray(0, 2000);
    await panel
      .getByTestId("use-recording-file")
      .setInputFiles({ name: "cut.m4a", mimeType: "audio/mp4", buffer: cut });
    await expect
      .poll(() => panel.getByTestId("use-recording-error").innerText(), { timeout: 20_000 })
      .toMatch(/could not decode “cut\.m4a”/);
    await page.screenshot({ path: path.join(ARTIFACTS, "use-recording-refused.png") });
  });

  it("a reload in the middle of listening keeps what was recorded and uploads it with the session", async () => {
    const { page } = await phone(mic, "dov");
    const seatId = await openBench(page, "4I1", "fine");
    await page.getByTestId("start-listening").tap();
    // Recording starts with listening, once the microphone is up ("stay quiet" shows).
    await page.getByTestId("calibrating").waitFor({ timeout: 10_000 });
    const startedAt = Date.now();
    await page.waitForFunction(
      () => Number(document.querySelector("[data-testid=stroke-count]")?.textContent) >= 3,
      null,
      { timeout: 30_000 },
    );
    const heard = Number(await page.getByTestId("stroke-count").innerText());
    // The recording so far sits in IndexedDB, piece by piece.
    const kept = await page.evaluate(
      () =>
        new Promise<number>((resolve, reject) => {
          const open = indexedDB.open("grindfade-takes");
          open.onerror = () => reject(open.error);
          open.onsuccess = () => {
            const req = open.result.transaction("pieces").objectStore("pieces").count();
            req.onsuccess = () => resolve(req.result);
          };
        }),
    );
    expect(kept).toBeGreaterThanOrEqual(3);
    const listenedS = (Date.now() - startedAt) / 1000;
    await page.reload();
    await page.getByTestId("start-listening").waitFor();

    const session = await recordedSession(page, seatId, "fine");
    const server = await seatFromServer(page, seatId);
    expect(server.stages.fine.sessions.find((s) => s.id === session.id)!.endedAt).not.toBeNull();
    const strokes = server.stages.fine.strokes.filter((s) => s.sessionId === session.id);
    expect(strokes.length).toBeGreaterThanOrEqual(heard);
    // The uploaded recording holds the sound up to the reload, less at most the piece being made;
    // it reaches to within that of every stroke heard before the reload (their times are on the recording's
    // own audio clock). The wall clock since "stay quiet" only bounds it from above: the fake
    // microphone's sound starts flowing a few seconds after that on this machine.
    const durationS = await page.evaluate(async (id) => {
      const bytes = await (await fetch(`/api/sessions/${id}/recording`)).arrayBuffer();
      const ctx = new OfflineAudioContext(1, 1, 44100);
      return (await ctx.decodeAudioData(bytes)).duration;
    }, session.id);
    // At most the piece being made (RECORDING_PIECE_MS, 1 s) and its write are missing.
    expect(durationS).toBeGreaterThan(strokes.at(-1)!.endS - 1.5);
    expect(durationS).toBeLessThanOrEqual(listenedS + 0.5);
    // Nothing of the take is left behind on the phone.
    await expect
      .poll(() =>
        page.evaluate(
          () =>
            new Promise<number>((resolve) => {
              const open = indexedDB.open("grindfade-takes");
              open.onsuccess = () => {
                const req = open.result.transaction("pieces").objectStore("pieces").count();
                req.onsuccess = () => resolve(req.result);
              };
            }),
        ),
      )
      .toBe(0);
  });

  it("shows a photo's upload progress on a slow connection", async () => {
    const { context, page } = await phone(null, "dov");
    await openBench(page, "4E2");
    const photos = page.getByTestId("seat-photos");
    await photos.waitFor();
    // A 1.5 MB JPEG (SOI and a JFIF marker, then filler) over an upload throttled to 300 kB/s.
    const jpeg = Buffer.concat([
      Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 16]),
      Buffer.from("JFIF\0"),
      Buffer.alloc(1_500_000, 7),
    ]);
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", {
      offline: false,
      latency: 20,
      downloadThroughput: 1_000_000,
      uploadThroughput: 300_000,
    });
    const seen = page.evaluate(
      () =>
        new Promise<number[]>((resolve) => {
          const percents: number[] = [];
          const watch = new MutationObserver(() => {
            const el = document.querySelector("[data-testid=photo-progress]");
            if (el) percents.push(Number(el.getAttribute("data-percent")));
            else if (percents.length) {
              watch.disconnect();
              resolve(percents);
            }
          });
          watch.observe(document.body, { subtree: true, childList: true, attributes: true });
        }),
    );
    await photos
      .locator('input[type="file"]')
      .setInputFiles({ name: "ring.jpg", mimeType: "image/jpeg", buffer: jpeg });
    const percents = await seen;
    await photos
      .getByTestId("photo-message")
      .getByText("Photo saved.")
      .waitFor({ timeout: 30_000 });
    // It moved through the middle, never backwards.
    expect(
      percents.some((p) => p > 0 && p < 100),
      percents.join(" "),
    ).toBe(true);
    expect(percents).toEqual([...percents].sort((a, b) => a - b));
  }, 120_000);
});
