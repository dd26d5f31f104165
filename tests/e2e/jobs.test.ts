// Booking in and editing a job through the shared form, as a supervisor, and the refusals a
// technician meets.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, PHONE, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("jobs", () => {
  it("a supervisor books in a job with a new customer and a V8 head, with field messages first", async () => {
    const context = await browser.newContext(PHONE);
    const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
    const page = await signIn(context, baseURL, sup.email, sup.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    await page.getByRole("link", { name: "Book in a job" }).tap();
    await page.waitForURL(/\/jobs\/new$/);
    // Nothing filled in and an odd V: messages on the fields, no job.
    await page.getByLabel("Banks").selectOption("v");
    await page.getByLabel("Cylinders").fill("7");
    await page.getByRole("button", { name: "Book in job" }).tap();
    await page.getByText("Describe the engine (make, size, valves).").waitFor();
    await page.getByText("A V head needs an even number of cylinders.").waitFor();
    await page.getByText("Choose a customer or type a new one.").waitFor();
    expect(new URL(page.url()).pathname).toBe("/jobs/new");

    await page.getByLabel("New customer's name").fill("Pellow Ferry Garage");
    await page.getByPlaceholder("Make, model, size, valves").fill("Ostrell 4.2 V8, two valves per cylinder, pushrods");
    await page.getByLabel("Cylinders").fill("8");
    await page.getByLabel("Intake valves / cyl.").fill("1");
    await page.getByLabel("Exhaust valves / cyl.").fill("1");
    await page.getByLabel("Camshafts").fill("0");
    await page.getByLabel("Journals / camshaft").fill("0");
    await page.getByRole("button", { name: "Book in job" }).tap();
    await page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/, { timeout: 15_000 });
    await page.getByTestId("seat-map").waitFor();
    expect(await page.locator('[data-testid=seat-map] a[href^="/bench/"]').count()).toBe(16);
    expect(await page.getByText("Pellow Ferry Garage").count()).toBeGreaterThan(0);
    await context.close();
  });

  it("a technician has no book-in button and is refused the form", async () => {
    const context = await browser.newContext(DESKTOP);
    const tech = DEMO_USERS.find((u) => u.role === "technician")!;
    const page = await signIn(context, baseURL, tech.email, tech.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    expect(await page.getByRole("link", { name: "Book in a job" }).count()).toBe(0);
    await page.goto(`${baseURL}/jobs/new`);
    await page.getByTestId("forbidden").waitFor();
    await context.close();
  });
});
