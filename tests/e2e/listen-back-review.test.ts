// Audit in one place, in the browser, on MHW-0144 (8 seats, all settled, awaiting audit; this
// file's alone, DEVELOPERS.md "Before you push"): the supervisor approves 1I1 on its listen-back
// page without a comment, is refused a send-back without one, sends 1E1 back with one, walks on
// with "Next seat", then approves every other settled seat from the job page with one comment, and
// sees each seat's fade curve and verdicts in its sign-off card. The head itself is not signed off
// here. (Seats skipped for their done-checks are held in tests/review/listen-back.test.ts: the
// demo's settled seats have all three checks passed.)
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
let page: Page;
let jobUrl: string;
const seatIds = new Map<string, string>();
const CODES = ["1I1", "1E1", "2I1", "2E1", "3I1", "3E1", "4I1", "4E1"];

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext(DESKTOP);
  const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
  page = await signIn(context, baseURL, sup.email, sup.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  jobUrl = `${baseURL}/jobs/${jobs.find((j) => j.number === "MHW-0144")!.id}`;
  await page.goto(jobUrl);
  for (const code of CODES) {
    const kind = code[1] === "I" ? "intake" : "exhaust";
    const link = page.getByTestId("seat-map").locator(`a[aria-label^="Cylinder ${code[0]} ${kind} ${code[2]},"]`);
    seatIds.set(code, (await link.getAttribute("data-seat-id"))!);
  }
});
afterAll(async () => {
  await browser?.close();
});

const panelOn = (p: Page) => p.getByTestId("seat-review-panel");
const cardOf = (code: string) => page.getByTestId("seat-review-panel").filter({ has: page.getByRole("heading", { name: new RegExp(`^Seat ${code} `) }) });

describe("listen-back: decide the seat where it is heard, then walk the head", () => {
  it("approves 1I1 with no comment, refuses a send-back without one, sends 1E1 back, and Next seat walks on", async () => {
    await page.goto(`${baseURL}/review/${seatIds.get("1I1")}`);
    const panel = panelOn(page);
    await panel.getByRole("heading", { name: "Seat 1I1 · Settled" }).waitFor();
    // The walk starts here: the next seat awaiting a decision is 1E1.
    expect(await page.getByTestId("next-seat").first().innerText()).toMatch(/Next seat\s*1E1\s*→/);
    // Its done-checks are all passed, so nothing needs typing: no comment, no reason asked for.
    expect(await panel.locator("textarea[name=comment]").inputValue()).toBe("");
    expect(await panel.locator("textarea[name=checksReason]").count()).toBe(0);
    await panel.getByRole("button", { name: "Approve seat" }).click();
    await panel.getByRole("heading", { name: "Seat 1I1 · Approved" }).waitFor({ timeout: 15_000 });
    const history = panel.getByRole("list", { name: "Review history" });
    expect(await history.locator("li").count()).toBe(1);
    expect(await history.innerText()).toContain("No comment.");
    expect(await history.getByTestId("checks-reason").count()).toBe(0);
    // 1I1 is decided: Next seat still points at 1E1.
    await page.getByTestId("next-seat").first().click();
    await page.waitForURL(`${baseURL}/review/${seatIds.get("1E1")}`);

    const next = panelOn(page);
    await next.getByRole("heading", { name: "Seat 1E1 · Settled" }).waitFor();
    expect(await page.getByTestId("next-seat").first().innerText()).toMatch(/Next seat\s*2I1\s*→/);
    await next.getByRole("button", { name: "Send back to the bench" }).click();
    await next.getByText("Write what to redo: a seat is sent back with a comment.").waitFor({ timeout: 15_000 });
    expect(await next.getByRole("heading", { name: "Seat 1E1 · Settled" }).count()).toBe(1);
    await next.locator("textarea[name=comment]").fill("Ring wide on the port side; one more fine session.");
    await next.getByRole("button", { name: "Send back to the bench" }).click();
    await next.getByRole("heading", { name: "Seat 1E1 · Sent back" }).waitFor({ timeout: 15_000 });
    expect(await next.getByRole("list", { name: "Review history" }).innerText()).toContain("Ring wide on the port side; one more fine session.");

    await page.getByTestId("next-seat").first().click();
    await page.waitForURL(`${baseURL}/review/${seatIds.get("2I1")}`);
    await panelOn(page).getByRole("heading", { name: "Seat 2I1 · Settled" }).waitFor();
    // From 2I1 the walk goes on to 2E1 (1I1 and 1E1 are decided).
    expect(await page.getByTestId("next-seat").first().innerText()).toMatch(/Next seat\s*2E1\s*→/);
  });
});

describe("the job page: every settled seat at once, and each seat's curve in its card", () => {
  it("approves the six settled seats with one comment, each seat on its own record", async () => {
    await page.goto(jobUrl);
    const form = page.getByTestId("approve-settled");
    await form.waitFor();
    const rest = ["2I1", "2E1", "3I1", "3E1", "4I1", "4E1"];
    expect(await form.innerText()).toContain(`6 seats are settled and not approved yet: ${rest.join(", ")}`);
    // Every one has its done-checks passed: no reason is asked for.
    expect(await form.getByTestId("approve-settled-short").count()).toBe(0);
    for (const code of rest) await cardOf(code).getByRole("heading", { name: `Seat ${code} · Settled` }).waitFor();

    await form.locator("textarea[name=comment]").fill("Walked the head: curves flat, rings even.");
    await form.getByRole("button", { name: "Approve every settled seat (6)" }).click();
    await page.getByTestId("approve-settled").getByText(`6 seats approved: ${rest.join(", ")}.`).waitFor({ timeout: 20_000 });
    for (const code of rest) {
      const card = cardOf(code);
      await card.getByRole("heading", { name: `Seat ${code} · Approved` }).waitFor({ timeout: 15_000 });
      // Each seat its own review, with the one comment and the reason.
      const history = card.getByRole("list", { name: "Review history" });
      expect(await history.locator("li").count()).toBe(1);
      expect(await history.innerText()).toContain("Walked the head: curves flat, rings even.");
    }
    await cardOf("1I1").getByRole("heading", { name: "Seat 1I1 · Approved" }).waitFor();
    await cardOf("1E1").getByRole("heading", { name: "Seat 1E1 · Sent back" }).waitFor();
    // Nothing settled is left to approve; the head is still awaiting audit (not signed off here).
    expect(await page.getByTestId("approve-settled").innerText()).toContain("No settled seat of the cylinder head awaits approval.");
    expect(await page.getByTestId("job-status").innerText()).toBe("Awaiting audit");

    // Each seat's approval is its own audit entry.
    const audit = (await (await page.request.get(`${baseURL}/api/audit?job=${jobUrl.split("/").pop()}`)).json()) as {
      entries: Array<{ action: string; entityId: string }>;
    };
    const approvals = audit.entries.filter((e) => e.action === "seat.approved").map((e) => e.entityId);
    expect(approvals.sort()).toEqual(["1I1", ...rest].map((c) => seatIds.get(c)!).sort());
  });

  it("shows a seat's fade curve and verdicts in its sign-off card", async () => {
    await page.goto(jobUrl);
    const card = cardOf("3E1");
    const curve = card.getByTestId("seat-review-curve");
    await curve.waitFor();
    const spark = curve.getByTestId("sparkline");
    expect(await spark.isVisible()).toBe(true);
    // The fine stage's ten demo strokes, drawn as a line.
    expect(await spark.getAttribute("aria-label")).toMatch(/^Fade curve, 10 strokes, from [\d.]+ dB to [\d.]+ dB$/);
    expect((await spark.locator("polyline").getAttribute("points"))!.split(" ")).toHaveLength(10);
    expect(await card.getByTestId("seat-review-verdict").innerText()).toMatch(/^Coarse: settled at stroke \d+ · Fine: settled at stroke \d+$/);
  });
});
