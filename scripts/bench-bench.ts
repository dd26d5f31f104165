// Speed of the bench screen, measured in Debian's Chromium on a fake-microphone run against a
// production build: analysis cost per 128-sample block in the Worker, time from a stroke being
// closed to its point on the curve, and the screen's first-load JavaScript (gzip, as served).
// Run: npm run bench:bench   (builds first when no build exists; BENCH_REBUILD=1 forces it)
import { DEMO_USERS } from "@/db/seed";
import { PHONE, launchBrowser, signIn } from "../tests/e2e/browser";
import { decayingSession } from "../tests/e2e/bench-audio";
import { buildApp, randomSecret, startServer } from "../tests/e2e/server";

const GOALS = { blockShare: 0.1, strokeToCurveMs: 150, firstLoadKb: 200 };

async function main() {
  const secret = randomSecret();
  buildApp(secret, process.env.BENCH_REBUILD === "1");
  const server = await startServer(secret);
  const mic = decayingSession();
  const browser = await launchBrowser([
    "--use-fake-device-for-media-stream",
    "--use-fake-ui-for-media-stream",
    `--use-file-for-fake-audio-capture=${mic.path}%noloop`,
  ]);
  try {
    const context = await browser.newContext({ ...PHONE, permissions: ["microphone"] });
    const tech = DEMO_USERS.find((u) => u.role === "technician")!;
    const page = await signIn(context, server.baseURL, tech.email, tech.password);
    await page.waitForURL(/\/jobs$/);
    const { jobs } = (await (await page.request.get(`${server.baseURL}/api/jobs`)).json()) as {
      jobs: Array<{ id: string; number: string }>;
    };
    await page.goto(`${server.baseURL}/jobs/${jobs.find((j) => j.number === "MHW-0141")!.id}`);
    const href = await page.locator('a[href^="/bench/"]', { hasText: "4E1" }).first().getAttribute("href");

    // First load of the bench screen in a fresh page: every script it fetches before listening.
    const fresh = await context.newPage();
    const cdp = await context.newCDPSession(fresh);
    await cdp.send("Network.enable");
    await cdp.send("Network.setCacheDisabled", { cacheDisabled: true });
    const scripts = new Map<string, string>();
    const sizes = new Map<string, number>();
    cdp.on("Network.responseReceived", (e: { requestId: string; type: string; response: { url: string } }) => {
      if (e.type === "Script") scripts.set(e.requestId, e.response.url);
    });
    cdp.on("Network.loadingFinished", (e: { requestId: string; encodedDataLength: number }) => {
      if (scripts.has(e.requestId)) sizes.set(e.requestId, e.encodedDataLength);
    });
    await fresh.goto(`${server.baseURL}${href}`, { waitUntil: "networkidle" });
    const firstLoadBytes = [...sizes.values()].reduce((a, b) => a + b, 0);
    const scriptCount = sizes.size;

    await fresh.getByTestId("start-listening").tap();
    await fresh.getByTestId("settled-cue").waitFor({ timeout: 60_000 });
    const blockUs = Number(await fresh.getByTestId("bench").getAttribute("data-block-us"));
    const sampleRate = Number(await fresh.getByTestId("bench").getAttribute("data-sample-rate"));
    const measures = await fresh.evaluate(() =>
      performance.getEntriesByName("grindfade:stroke-to-curve").map((m) => ({
        renderMs: m.duration,
        detectionMs: ((m as PerformanceMeasure).detail as { detectionMs: number }).detectionMs,
      })),
    );
    const blockMs = (128 / sampleRate) * 1000;
    const totals = measures.map((m) => m.renderMs + m.detectionMs).sort((a, b) => a - b);
    const renders = measures.map((m) => m.renderMs).sort((a, b) => a - b);
    const pct = (xs: number[], p: number) => xs[Math.min(xs.length - 1, Math.floor(p * xs.length))] ?? NaN;

    console.log(`bench screen, Chromium ${browser.version()}, AudioContext ${sampleRate} Hz`);
    console.log(
      `analysis per 128-sample block: ${blockUs.toFixed(2)} µs mean = ${((blockUs / 1000 / blockMs) * 100).toFixed(3)}% of the block's ${blockMs.toFixed(2)} ms (goal ≤ ${GOALS.blockShare * 100}%)`,
    );
    console.log(
      `stroke closed → on the curve: median ${pct(renders, 0.5).toFixed(1)} ms, max ${pct(renders, 1).toFixed(1)} ms over ${renders.length} strokes`,
    );
    console.log(
      `stroke end (sound stops) → on the curve, including the lift that confirms it: median ${pct(totals, 0.5).toFixed(0)} ms, max ${pct(totals, 1).toFixed(0)} ms (goal ≤ ${GOALS.strokeToCurveMs} ms)`,
    );
    console.log(
      `first-load JavaScript: ${(firstLoadBytes / 1024).toFixed(1)} kB as transferred (gzip) in ${scriptCount} scripts (goal ≤ ${GOALS.firstLoadKb} kB)`,
    );
    const largest = [...sizes.entries()].sort((a, b) => b[1] - a[1]).slice(0, 5);
    for (const [id, bytes] of largest) console.log(`  ${(bytes / 1024).toFixed(1).padStart(6)} kB  ${new URL(scripts.get(id)!).pathname}`);
    // One line per goal, as every benchmark ends.
    const share = blockUs / 1000 / blockMs;
    const goal = (name: string, held: boolean, figures: string) => console.log(`GOAL ${name}: ${held ? "held" : "missed"} (${figures})`);
    goal("block-share", share <= GOALS.blockShare, `${(share * 100).toFixed(3)}% of a 128-sample block; goal ≤ ${GOALS.blockShare * 100}%`);
    goal("stroke-to-curve", pct(totals, 1) <= GOALS.strokeToCurveMs, `max ${pct(totals, 1).toFixed(0)} ms over ${totals.length} strokes; goal ≤ ${GOALS.strokeToCurveMs} ms`);
    goal("first-load-js", firstLoadBytes / 1024 <= GOALS.firstLoadKb, `${(firstLoadBytes / 1024).toFixed(1)} kB gzip; goal ≤ ${GOALS.firstLoadKb} kB`);
  } finally {
    await browser.close();
    await server.stop();
  }
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exit(1);
});
