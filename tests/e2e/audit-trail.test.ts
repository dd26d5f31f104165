// The audit trail as a supervisor reads it, in a real browser: a technician saves the serial
// numbers of three valves of MHW-0142 (seats 2I2, 2E1, 2E2, this file's own) in quick succession;
// the supervisor then finds them as one line that opens to the three entries in words, follows the
// job's link, downloads the filtered trail as CSV and sees the print view without the navigation.
import fs from "node:fs";
import { randomUUID } from "node:crypto";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const SEATS = ["2I2", "2E1", "2E2"] as const;
const run = randomUUID().slice(0, 6).toUpperCase();
const serialOf = (code: string) => `AUD-${run}-${code}`;

let browser: Browser;
let supervisor: Page;
let jobId: string;
const tags = new Map<string, string>();

const user = (email: string) => DEMO_USERS.find((u) => u.email === email)!;

beforeAll(async () => {
  browser = await launchBrowser();
  // The technician assigned to MHW-0142, on a phone at the bench.
  const dov = user("dov@millrace.example");
  const tech = await signIn(await browser.newContext(PHONE), baseURL, dov.email, dov.password);
  await tech.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await tech.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  jobId = jobs.find((j) => j.number === "MHW-0142")!.id;
  await tech.goto(`${baseURL}/jobs/${jobId}`);
  await tech.getByText("Valves and their seats").click();
  for (const code of SEATS) {
    const row = tech.getByTestId("valve-row").filter({ hasText: new RegExp(`Seat\\s*${code}\\s*holds valve`) });
    tags.set(code, (await row.getAttribute("data-valve"))!);
    await row.getByLabel("Serial").fill(serialOf(code));
    await row.getByRole("button", { name: "Save identity" }).click();
    await row.getByText(`Valve ${tags.get(code)} saved.`).waitFor({ timeout: 15_000 });
  }
  await tech.context().close();

  const rhea = user("rhea@millrace.example");
  supervisor = await signIn(await browser.newContext({ ...DESKTOP, acceptDownloads: true }), baseURL, rhea.email, rhea.password);
  await supervisor.waitForURL(/\/jobs(\?mine=1)?$/);
});
afterAll(async () => {
  await browser?.close();
});

async function filterToBurst(page: Page) {
  await page.goto(`${baseURL}/audit`);
  await page.getByLabel("Job").selectOption({ label: "MHW-0142" });
  await page.getByLabel("Person").selectOption({ label: "Dov Achterberg" });
  await page.getByRole("button", { name: "Filter" }).click();
  await page.waitForURL(/\/audit\?job=.+&person=.+/);
}

describe("the audit trail, as a supervisor reads it", () => {
  it("shows the three quick saves as one line in words that opens to each entry", async () => {
    await filterToBurst(supervisor);
    await expect.poll(() => supervisor.getByTestId("audit-filters-heading").textContent()).toBe("Showing job MHW-0142, by Dov Achterberg, all dates");
    const burst = supervisor.getByTestId("audit-burst").first();
    const summary = burst.locator("summary");
    expect((await summary.textContent())!).toMatch(/^Dov Achterberg updated the tags and numbers of 3 valves on MHW-0142 \(3 entries — open to see each\)/);
    // Closed, the single entries are not shown; opened, all three are, newest first, in words.
    const entries = burst.getByTestId("audit-entry");
    expect(await entries.first().isVisible()).toBe(false);
    await summary.click();
    await expect.poll(() => entries.first().isVisible()).toBe(true);
    expect(await entries.count()).toBe(3);
    const texts = await entries.allTextContents();
    for (const [i, code] of [...SEATS].reverse().entries()) {
      expect(texts[i]).toContain(`Dov Achterberg updated the tag and numbers of valve ${tags.get(code)} on MHW-0142`);
      expect(texts[i]).toContain(`→ ${serialOf(code)}`);
      expect(texts[i]).toContain("serial number:");
      expect(texts[i]).not.toMatch(/[{}"]|valve\.identified/);
    }
  });

  it("links the job to its page", async () => {
    const link = supervisor.getByTestId("audit-burst").first().locator("summary").getByRole("link", { name: "MHW-0142" });
    expect(await link.getAttribute("href")).toBe(`/jobs/${jobId}`);
    await link.click();
    await supervisor.waitForURL(`${baseURL}/jobs/${jobId}`);
    expect(await supervisor.getByRole("heading", { level: 1 }).first().textContent()).toContain("MHW-0142");
  });

  it("downloads the filtered trail as CSV, in words with the raw action code", async () => {
    await filterToBurst(supervisor);
    const [download] = await Promise.all([supervisor.waitForEvent("download"), supervisor.getByTestId("audit-csv").click()]);
    expect(download.suggestedFilename()).toMatch(/^audit-trail-\d{4}-\d{2}-\d{2}\.csv$/);
    const text = fs.readFileSync((await download.path())!, "utf8").replace(/^\uFEFF/, "");
    const { data, errors, meta } = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    expect(errors).toEqual([]);
    expect(meta.fields).toEqual(["when", "person", "entry", "changes", "job", "seat", "action", "at_iso", "entry_id"]);
    // Only the filtered entries: Dov's, on MHW-0142.
    expect(data.length).toBeGreaterThanOrEqual(3);
    expect(new Set(data.map((r) => r.person))).toEqual(new Set(["Dov Achterberg"]));
    expect(new Set(data.map((r) => r.job))).toEqual(new Set(["MHW-0142"]));
    const ours = data.filter((r) => r.changes!.includes(`AUD-${run}-`));
    expect(ours.map((r) => r.action)).toEqual(["valve.identified", "valve.identified", "valve.identified"]);
    expect(ours.map((r) => r.entry)).toEqual([...SEATS].reverse().map((c) => `Dov Achterberg updated the tag and numbers of valve ${tags.get(c)} on MHW-0142`));
    for (const r of ours) expect(new Date(r.at_iso!).toISOString()).toBe(r.at_iso);
  });

  it("prints without the navigation or the filter form, the filters as its heading", async () => {
    await filterToBurst(supervisor);
    const header = supervisor.locator("body > div > header");
    const form = supervisor.getByRole("form", { name: "Filter the audit trail" });
    expect(await header.isVisible()).toBe(true);
    expect(await form.isVisible()).toBe(true);
    await supervisor.emulateMedia({ media: "print" });
    try {
      expect(await header.isVisible()).toBe(false);
      expect(await form.isVisible()).toBe(false);
      expect(await supervisor.getByTestId("audit-csv").isVisible()).toBe(false);
      expect(await supervisor.getByTestId("audit-filters-heading").isVisible()).toBe(true);
      expect(await supervisor.getByTestId("audit-filters-heading").textContent()).toBe("Showing job MHW-0142, by Dov Achterberg, all dates");
      expect(await supervisor.getByTestId("audit-burst").first().isVisible()).toBe(true);
    } finally {
      await supervisor.emulateMedia({ media: "screen" });
    }
  });
});
