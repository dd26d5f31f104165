// Specifications as the manual gives them: a supervisor adds an engine of this test's own (never
// the demo engines other files use), enters a stem-to-guide clearance in inches and a cap torque
// in lbf·ft, sees each as typed with its SI value, renames the engine and retires it, and it is
// no longer offered when booking in.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
let page: Page;

const stamp = Date.now();
const engine = `Orrin K12 1.2 8V e2e ${stamp}`;
const renamed = `Orrin K12 1.2 8V early e2e ${stamp}`;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext(DESKTOP);
  const rhea = DEMO_USERS.find((u) => u.email === "rhea@millrace.example")!;
  page = await signIn(context, baseURL, rhea.email, rhea.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
});
afterAll(async () => {
  await browser?.close();
});

const engineOptions = async () => {
  await page.goto(`${baseURL}/jobs/new`);
  const select = page.getByLabel("Specifications from the library");
  await select.waitFor();
  return select.locator("option").allInnerTexts();
};

describe("specifications in the manual's units", () => {
  it("figures typed in in and lbf·ft are shown as typed with their SI values", async () => {
    await page.goto(`${baseURL}/specs`);
    const add = page.getByRole("region", { name: "Add an engine" });
    await add.getByLabel("Engine").fill(engine);
    await add.getByLabel("Source of the figures").fill("Orrin workshop manual, inch edition");
    await add.getByRole("button", { name: "Add engine" }).click();
    const section = page.getByRole("region", { name: engine });
    await section.waitFor();
    await expect(section.getByTestId("spec-jobs").innerText()).resolves.toContain("No job uses this engine yet.");

    await section.getByText("Add or change a figure").click();
    const form = section.locator("form", { has: page.getByRole("button", { name: "Save figure" }) });
    await form.getByLabel("Figure").selectOption("stem_guide_clearance_intake");
    await form.getByLabel("Unit, as the manual gives it").selectOption("in");
    await form.getByLabel("Min (in)").fill("0.0010");
    await form.getByLabel("Max (in)").fill("0.0023");
    await form.getByLabel("Service limit (in)").fill("0.0031");
    // The SI value shows while typing (25.4 mm per inch, NIST SP 811).
    await form.getByText("= 0.0254 mm").waitFor();
    await expect(form.getByTestId("affected-preview").innerText()).resolves.toBe("No open job takes its limits from this figure.");
    await form.getByRole("button", { name: "Save figure" }).click();
    await form.getByText("Stem-to-guide clearance, intake saved.").waitFor();
    const row = section.locator('tr[data-figure="stem_guide_clearance_intake"]');
    await row.waitFor();
    const rowText = await row.innerText();
    expect(rowText).toContain("0.0010 in");
    expect(rowText).toContain("0.0254 mm");
    expect(rowText).toContain("0.0023 in");
    expect(rowText).toContain("0.0584 mm");
    expect(rowText).toContain("0.0031 in");
    expect(rowText).toContain("0.0787 mm");

    // A cap torque in lbf·ft: 7.4 lbf·ft × 1.355 818 N·m (NIST SP 811) = 10.0 N·m.
    await form.getByLabel("Figure").selectOption("cap_bolt_torque");
    await form.getByLabel("Unit, as the manual gives it").selectOption("lbf·ft");
    await form.getByLabel("Value (lbf·ft)").fill("7.4");
    await form.getByRole("button", { name: "Save figure" }).click();
    await form.getByText("Camshaft cap bolt torque saved.").waitFor();
    const torque = section.locator('tr[data-figure="cap_bolt_torque"]');
    await torque.waitFor();
    expect(await torque.innerText()).toContain("7.4 lbf·ft");
    expect(await torque.innerText()).toContain("10 N·m");
  });

  it("an absurd figure or a unit gone wrong gets a field message and saves nothing", async () => {
    await page.goto(`${baseURL}/specs`);
    const section = page.getByRole("region", { name: engine });
    await section.getByText("Add or change a figure").click();
    const form = section.locator("form", { has: page.getByRole("button", { name: "Save figure" }) });
    await form.getByLabel("Figure").selectOption("deck_flatness");
    await form.getByLabel("Unit, as the manual gives it").selectOption("in");
    await form.getByLabel("Max (in)").fill("20");
    await form.getByRole("button", { name: "Save figure" }).click();
    await form.getByText("20 in is 508 mm: far too large for this figure.", { exact: false }).waitFor();
    expect(await section.locator('tr[data-figure="deck_flatness"]').count()).toBe(0);
  });

  it("the engine is offered for new jobs, then renamed and retired, and no longer offered", async () => {
    expect(await engineOptions()).toContain(engine);
    await page.goto(`${baseURL}/specs`);
    let section = page.getByRole("region", { name: engine });
    await section.getByText("Rename or retire").click();
    await section.getByLabel("New name").fill(renamed);
    await section.getByRole("button", { name: "Rename" }).click();
    section = page.getByRole("region", { name: renamed });
    await section.waitFor();
    // The figures stay with it.
    expect(await section.locator('tr[data-figure="cap_bolt_torque"]').innerText()).toContain("7.4 lbf·ft");
    expect(await engineOptions()).toContain(renamed);

    await page.goto(`${baseURL}/specs`);
    section = page.getByRole("region", { name: renamed });
    await section.getByText("Rename or retire").click();
    await section.getByRole("button", { name: "Retire from new jobs" }).click();
    await section.getByText("Retired", { exact: true }).waitFor();
    const options = await engineOptions();
    expect(options).not.toContain(renamed);
    expect(options).not.toContain(engine);
    expect(options.some((o) => o.startsWith("Varda VX18"))).toBe(true);
  });

  it("each engine lists the jobs that use it, as links", async () => {
    await page.goto(`${baseURL}/specs`);
    const varda = page.getByRole("region", { name: "Varda VX18 1.8 16V" });
    const jobs = varda.getByTestId("spec-jobs");
    await jobs.getByRole("link", { name: "MHW-0141" }).waitFor();
    await varda.getByText("Add or change a figure").click();
    // The preview names the open jobs whose limits a change of this figure would move.
    await varda.getByLabel("Figure").selectOption("installed_spring_height");
    await expect(varda.getByTestId("affected-preview").innerText()).resolves.toMatch(/^Changes the limits for .*MHW-0141 \(/);
    await jobs.getByRole("link", { name: "MHW-0141" }).click();
    await page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/);
    await expect(page.getByTestId("job-engine-spec").innerText()).resolves.toContain("Varda VX18 1.8 16V");
  });
});
