// The done-checks on a phone: Dov lapps two seats of MHW-0142 to settled (through the API, as the
// bench would save them), records the three done-checks on 3I1 at the bench with a note and a
// photo, and the supervisor sees them on the sign-off panel; approving 3I2, which has none, asks
// for a reason, and the reason is printed in the head report. Seats 3I1 and 3I2 of MHW-0142 are
// this file's alone (DEVELOPERS.md, "Before you push").
import { randomUUID } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { decayingContrasts } from "@/lib/audio/synth";
import { PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const ARTIFACTS = path.join(process.cwd(), "tests", ".artifacts");
fs.mkdirSync(ARTIFACTS, { recursive: true });
// A 1×1 PNG: the seat photo upload reads images by their bytes.
const PNG = Buffer.from("iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNk+M9QDwADhgGAWjR9awAAAABJRU5ErkJggg==", "base64");

let browser: Browser;
let jobId: string;
const seatIds = new Map<string, string>();

const user = (email: string) => DEMO_USERS.find((u) => u.email === email)!;

async function signedIn(email: string): Promise<Page> {
  const context = await browser.newContext(PHONE);
  const u = user(email);
  const page = await signIn(context, baseURL, u.email, u.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  return page;
}

/** One session of strokes fading to settled on the stage, saved as the bench saves them. */
async function lapToSettled(page: Page, seatId: string, stage: "coarse" | "fine", deviceId: string) {
  const sessionId = randomUUID();
  const started = await page.request.post(`${baseURL}/api/seats/${seatId}/sessions`, {
    headers: { origin: baseURL },
    data: { sessionId, stage, deviceId, sampleRateHz: 48000, noiseFloorDb: -62 },
  });
  expect(started.status(), await started.text()).toBe(201);
  // Invented strokes fading from 9 dB toward 0.4 dB, two seconds apart.
  const contrasts = decayingContrasts(12, 9, 0.4, 2.2);
  const saved = await page.request.post(`${baseURL}/api/sessions/${sessionId}/strokes`, {
    headers: { origin: baseURL },
    data: {
      strokes: contrasts.map((c, i) => ({
        clientId: randomUUID(),
        index: i + 1,
        startS: 2 + 2 * i,
        endS: 3.2 + 2 * i,
        onsetDb: -30 + c,
        bodyDb: -30,
        contrastDb: c,
        flags: [],
      })),
    },
  });
  expect(saved.status(), await saved.text()).toBe(201);
  const ended = await page.request.post(`${baseURL}/api/sessions/${sessionId}/end`, { headers: { origin: baseURL } });
  expect(ended.status()).toBe(200);
}

/** Every visible button, link and file input of the section is at least 44 × 44 px. */
async function smallTargets(page: Page, scope: string): Promise<string[]> {
  return page.evaluate((sel) => {
    const root = document.querySelector(sel)!;
    return [...root.querySelectorAll("button, a, input:not([type=hidden]), summary")]
      .filter((el) => (el as HTMLElement).offsetParent !== null)
      .map((el) => ({ el, r: el.getBoundingClientRect() }))
      .filter(({ el, r }) => r.height < 44 || (r.width < 44 && el.tagName !== "INPUT"))
      .map(({ el, r }) => `${el.tagName} "${(el.textContent ?? "").trim().slice(0, 30)}" ${r.width.toFixed(0)}×${r.height.toFixed(0)}`);
  }, scope);
}

beforeAll(async () => {
  browser = await launchBrowser();
  const dov = await signedIn("dov@millrace.example");
  const { jobs } = (await (await dov.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  jobId = jobs.find((j) => j.number === "MHW-0142")!.id;
  await dov.goto(`${baseURL}/jobs/${jobId}`);
  for (const code of ["3I1", "3I2"]) {
    const href = await dov.locator('[data-testid=seat-map] a[href^="/bench/"]', { hasText: code }).first().getAttribute("href");
    seatIds.set(code, href!.split("/").pop()!);
  }
  for (const code of ["3I1", "3I2"]) {
    const device = `done-checks-e2e-${code}-${randomUUID()}`;
    await lapToSettled(dov, seatIds.get(code)!, "coarse", device);
    await lapToSettled(dov, seatIds.get(code)!, "fine", device);
  }
  await dov.context().close();
}, 60_000);
afterAll(async () => {
  await browser?.close();
});

describe("done-checks on a phone", () => {
  it("the technician records the three checks on a settled seat at the bench", async () => {
    const page = await signedIn("dov@millrace.example");
    await page.goto(`${baseURL}/bench/${seatIds.get("3I1")}`);
    await page.getByTestId("seat-state").getByText("Settled").waitFor();
    const section = page.getByTestId("done-checks");
    // Settled in fine: the section is open by itself.
    await section.getByTestId("bench-done-checks").waitFor({ timeout: 20_000 });
    expect(await section.getAttribute("open")).not.toBeNull();
    expect(await section.getByTestId("done-checks-count").innerText()).toBe("0 of 3 passed");
    // The leak test names its port and carries the cautions for the solvent.
    const leakForm = section.getByTestId("done-check-form-leak_test");
    expect(await leakForm.innerText()).toContain("intake port of cylinder 3");
    expect(await leakForm.getByTestId("solvent-cautions").innerText()).toMatch(/flammable.*ventilation.*nitrile gloves.*eye protection \(OSHA 29 CFR 1910\.133\)/s);
    // No contact width measured on this seat: the ring says so and where to measure it.
    expect(await section.getByTestId("ring-width").innerText()).toMatch(/^Width not measured yet \(spec /);

    const ring = section.getByTestId("done-check-form-contact_ring");
    await ring.getByLabel("Note (optional)").fill("Even dull grey, all round");
    await ring.locator("input[type=file]").setInputFiles({ name: "ring.png", mimeType: "image/png", buffer: PNG });
    await ring.getByRole("button", { name: "Pass" }).tap();
    await section.getByTestId("done-check-message").getByText("Contact ring on seat 3I1: pass recorded.").waitFor({ timeout: 20_000 });
    // A saved check clears its form.
    expect(await ring.getByLabel("Note (optional)").inputValue()).toBe("");

    // Offline: nothing is recorded, the screen stays up and says so.
    await page.context().setOffline(true);
    await section.getByTestId("done-check-form-marking_compound").getByRole("button", { name: "Pass" }).tap();
    await section.getByTestId("done-check-message").getByText(/^Not recorded: the server could not be reached/).waitFor({ timeout: 20_000 });
    expect(await section.getByTestId("done-checks-count").innerText()).toBe("1 of 3 passed");
    await page.context().setOffline(false);
    await section.getByTestId("done-check-form-marking_compound").getByRole("button", { name: "Pass" }).tap();
    await section.getByTestId("done-check-message").getByText("Marking-compound test on seat 3I1: pass recorded.").waitFor({ timeout: 20_000 });
    await leakForm.getByRole("button", { name: "Pass" }).tap();
    await section.getByTestId("done-check-message").getByText("Leak test on seat 3I1: pass recorded.").waitFor({ timeout: 20_000 });
    expect(await section.getByTestId("done-checks-count").innerText()).toBe("3 of 3 passed");

    const summary = section.getByTestId("bench-done-checks");
    for (const kind of ["contact_ring", "marking_compound", "leak_test"]) {
      const line = summary.locator(`[data-check=${kind}]`);
      expect(await line.getAttribute("data-result")).toBe("pass");
      expect(await line.innerText()).toContain("Dov");
    }
    expect(await summary.locator("[data-check=contact_ring]").innerText()).toContain("“Even dull grey, all round”");
    const photoHref = await summary.locator("[data-check=contact_ring]").getByRole("link", { name: "photo" }).getAttribute("href");
    const photo = await page.request.get(`${baseURL}${photoHref}`);
    expect(photo.status()).toBe(200);
    expect(Buffer.from(await photo.body()).equals(PNG)).toBe(true);

    expect(await smallTargets(page, "[data-testid=done-checks]")).toEqual([]);
    // The phone shows no sideways scroll.
    const wider = await page.evaluate(() =>
      [...document.querySelectorAll("[data-testid=done-checks] *")]
        .filter((el) => el.getBoundingClientRect().right > 390.5)
        .map((el) => `${el.tagName}.${(el as HTMLElement).className} ${el.getBoundingClientRect().right.toFixed(0)}`),
    );
    expect(wider).toEqual([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await section.screenshot({ path: path.join(ARTIFACTS, "done-checks-bench.png") });

    // The server has them too, after a reload.
    await page.reload();
    await page.getByTestId("done-checks").getByTestId("done-checks-count").getByText("3 of 3 passed").waitFor({ timeout: 20_000 });
    await page.context().close();
  });

  it("the supervisor sees them on the sign-off panel, and approving a seat without them asks for a reason", async () => {
    const page = await signedIn("rhea@millrace.example");
    await page.goto(`${baseURL}/jobs/${jobId}`);
    await page.getByText("Audit and sign-off").tap();
    const panel = (code: string) => page.getByTestId("seat-review-panel").filter({ has: page.getByRole("heading", { name: new RegExp(`^Seat ${code} `) }) });

    const checked = panel("3I1");
    const lines = checked.getByTestId("seat-done-checks");
    for (const kind of ["contact_ring", "marking_compound", "leak_test"]) {
      expect(await lines.locator(`[data-check=${kind}]`).getAttribute("data-result")).toBe("pass");
      expect(await lines.locator(`[data-check=${kind}]`).innerText()).toContain("Dov Achterberg");
    }
    expect(await lines.locator("[data-check=leak_test]").innerText()).toContain("intake port of cylinder 3");
    // All passed: no reason asked for.
    expect(await checked.locator("textarea[name=checksReason]").count()).toBe(0);
    await checked.locator("textarea[name=comment]").fill("Even ring, checks all passed.");
    await checked.getByRole("button", { name: "Approve seat" }).tap();
    await checked.getByRole("button", { name: "Approve seat" }).waitFor({ state: "detached", timeout: 15_000 });

    const unchecked = panel("3I2");
    expect(await unchecked.getByTestId("seat-done-checks").locator("[data-result=missing]").count()).toBe(3);
    const reason = unchecked.locator("textarea[name=checksReason]");
    await reason.waitFor();
    await unchecked.locator("textarea[name=comment]").fill("Band even on the curve.");
    await unchecked.getByRole("button", { name: "Approve seat" }).tap();
    await unchecked.getByText(/Seat 3I2's done-checks are not all passed \(contact ring not recorded; marking-compound test not recorded; leak test not recorded\)/).first().waitFor({ timeout: 15_000 });
    expect(await reason.getAttribute("aria-invalid")).toBe("true");
    expect(await unchecked.getByRole("heading", { name: /^Seat 3I2 · Settled/ }).count()).toBe(1);
    await page.screenshot({ path: path.join(ARTIFACTS, "done-checks-reason.png"), fullPage: true });

    await unchecked.locator("textarea[name=comment]").fill("Band even on the curve.");
    await reason.fill("Leak-tested with the head assembled; customer waiting.");
    await unchecked.getByRole("button", { name: "Approve seat" }).tap();
    await unchecked.getByTestId("checks-reason").getByText("Leak-tested with the head assembled; customer waiting.").waitFor({ timeout: 15_000 });

    // The listen-back page shows them too.
    await page.goto(`${baseURL}/review/${seatIds.get("3I1")}`);
    expect(await page.getByTestId("review-done-checks").locator("[data-result=pass]").count()).toBe(3);

    // The head report prints the done-checks and the reason.
    await page.goto(`${baseURL}/jobs/${jobId}/report`);
    const row = page.getByTestId("report-done-checks").locator('tr[data-seat="3I1"]');
    for (const kind of ["contact_ring", "marking_compound", "leak_test"]) expect(await row.locator(`td[data-check=${kind}]`).innerText()).toMatch(/^Pass/);
    expect(await page.getByTestId("report-done-checks").locator('tr[data-seat="3I2"]').innerText()).toContain("Not recorded");
    expect(await page.getByTestId("report-checks-reason").innerText()).toContain("Leak-tested with the head assembled; customer waiting.");
    await page.context().close();
  });
});
