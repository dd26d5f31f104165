// Sign-in, roles and the optimistic gate, against a production build in Debian's Chromium.
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

function demo(role: "technician" | "supervisor" | "admin") {
  const u = DEMO_USERS.find((x) => x.role === role);
  if (!u) throw new Error(`no demo ${role}`);
  return u;
}

const EXPECTED_NAV: Record<string, { has: string[]; lacks: string[] }> = {
  technician: { has: ["Jobs board", "My work"], lacks: ["People", "Awaiting audit", "Customers", "Shop details"] },
  supervisor: { has: ["Jobs board", "Awaiting audit", "My work", "Customers"], lacks: ["People", "Shop details"] },
  admin: { has: ["Jobs board", "Awaiting audit", "People", "Customers", "Shop details"], lacks: ["My work"] },
};

describe("sign-in per role", () => {
  for (const role of ["technician", "supervisor", "admin"] as const) {
    it(`${role} signs in and sees the ${role}'s navigation`, async () => {
      const context = await browser.newContext(DESKTOP);
      const user = demo(role);
      const page = await signIn(context, baseURL, user.email, user.password);
      await page.waitForURL(/\/jobs(\?mine=1)?$/);
      const nav = page.getByRole("navigation", { name: "Main" });
      for (const label of EXPECTED_NAV[role]!.has) {
        await expect(nav.getByRole("link", { name: label, exact: true }).count()).resolves.toBe(1);
      }
      for (const label of EXPECTED_NAV[role]!.lacks) {
        await expect(nav.getByRole("link", { name: label, exact: true }).count()).resolves.toBe(0);
      }
      await expect(page.getByTestId("signed-in-as").innerText()).resolves.toContain(user.name);
      await context.close();
    });
  }

  it("the demo technician lands on their own work, then sees the whole jobs board, on a phone-sized screen", async () => {
    const context = await browser.newContext(PHONE);
    const user = demo("technician");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs\?mine=1$/);
    const cards = page.getByTestId("jobs-cards");
    await cards.waitFor();
    const own = await cards.getByRole("listitem").count();
    expect(own).toBeGreaterThanOrEqual(1);
    await page.goto(`${baseURL}/jobs`);
    await page.getByRole("heading", { name: "Jobs board" }).waitFor();
    await expect.poll(() => cards.getByRole("listitem").count()).toBeGreaterThanOrEqual(3);
    expect(await cards.getByRole("listitem").count()).toBeGreaterThan(own);
    // The desktop table is hidden on a phone; the page must not scroll sideways.
    expect(await page.getByTestId("jobs-table").isVisible()).toBe(false);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    // The menu opens the role's navigation.
    await page.getByRole("button", { name: "Menu" }).tap();
    await expect(page.locator("#mobile-nav").getByRole("link", { name: "My work" }).isVisible()).resolves.toBe(true);
    await context.close();
  });

  it("sign-out returns to the sign-in page and the board is closed again", async () => {
    const context = await browser.newContext(DESKTOP);
    const user = demo("supervisor");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await page.goto(`${baseURL}/jobs`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await context.close();
  });
});

describe("anonymous visitors and bad sign-ins", () => {
  it("an anonymous visitor is redirected to sign-in, keeping where they were going", async () => {
    const context = await browser.newContext(DESKTOP);
    const page = await context.newPage();
    await page.goto(`${baseURL}/admin/people`);
    const url = new URL(page.url());
    expect(url.pathname).toBe("/sign-in");
    expect(url.searchParams.get("callbackUrl")).toBe("/admin/people");
    await context.close();
  });

  it("a wrong password shows a message and stays on sign-in", async () => {
    const context = await browser.newContext(DESKTOP);
    const page = await signIn(context, baseURL, demo("supervisor").email, "not-the-password");
    const error = page.getByTestId("sign-in-error");
    await error.waitFor();
    expect(await error.innerText()).toMatch(/wrong e-mail or password/i);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await context.close();
  });

  it("a malformed sign-in gets field messages, not a crash", async () => {
    const context = await browser.newContext(DESKTOP);
    const page = await signIn(context, baseURL, "not-an-address", "");
    await page.getByText("That does not look like an e-mail address.").waitFor();
    await page.getByText("Enter your password.").waitFor();
    await context.close();
  });

  it("repeated wrong passwords lock the account with a clear message", async () => {
    // The e2e server runs with GRINDFADE_SIGNIN_MAX_FAILURES=3. The account locked is one the
    // admin adds here for it: the demo people are signed in by other files, in any order.
    const context = await browser.newContext(DESKTOP);
    const admin = demo("admin");
    const adminPage = await signIn(context, baseURL, admin.email, admin.password);
    await adminPage.waitForURL(/\/jobs(\?mine=1)?$/);
    await adminPage.goto(`${baseURL}/admin/people`);
    const user = { email: `locked-${Date.now()}@millrace.example`, password: "a lapping stick with a worn cup" };
    const form = adminPage.locator("form", { has: adminPage.getByRole("button", { name: "Add person" }) });
    await form.getByLabel("Name", { exact: true }).fill("Wren Tallis");
    await form.getByLabel("E-mail", { exact: true }).fill(user.email);
    await form.locator("select[name=role]").selectOption("technician");
    await form.getByLabel("First password").fill(user.password);
    await form.getByRole("button", { name: "Add person" }).click();
    await adminPage.getByText(user.email).first().waitFor();
    await context.clearCookies();
    const page = await context.newPage();
    await page.goto(`${baseURL}/sign-in`);
    for (let i = 0; i < 3; i++) {
      await page.getByLabel("E-mail").fill(user.email);
      await page.getByLabel("Password").fill(`wrong-${i}`);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.getByTestId("sign-in-error").waitFor();
      await page.waitForFunction(() => !document.querySelector("button[type=submit]")?.hasAttribute("disabled"));
    }
    expect(await page.getByTestId("sign-in-error").innerText()).toMatch(/locked/i);
    // Even the right password is refused while the lock holds.
    await page.getByLabel("Password").fill(user.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForFunction(() => !document.querySelector("button[type=submit]")?.hasAttribute("disabled"));
    expect(await page.getByTestId("sign-in-error").innerText()).toMatch(/locked/i);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await context.close();
  });
});

describe("API and pages answer for themselves", () => {
  it("GET /api/jobs without a session is a 401 JSON with a message", async () => {
    const res = await fetch(`${baseURL}/api/jobs`);
    expect(res.status).toBe(401);
    expect(res.headers.get("content-type")).toMatch(/application\/json/);
    const body = (await res.json()) as { error: string; message: string };
    expect(body.error).toBe("unauthorized");
    expect(body.message.length).toBeGreaterThan(5);
  });

  it("GET /api/jobs with a session lists the shop's jobs", async () => {
    const context = await browser.newContext(DESKTOP);
    const user = demo("technician");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const res = await page.request.get(`${baseURL}/api/jobs`);
    expect(res.status()).toBe(200);
    const body = (await res.json()) as { jobs: Array<{ number: string; customerName: string; seatCount: number }> };
    expect(body.jobs.length).toBeGreaterThanOrEqual(3);
    const v6 = body.jobs.find((j) => j.seatCount === 24);
    expect(v6, "the V6 24-valve head has 24 seats").toBeTruthy();
    await context.close();
  });

  it("a technician is refused the people page", async () => {
    const context = await browser.newContext(DESKTOP);
    const user = demo("technician");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    await page.goto(`${baseURL}/admin/people`);
    await page.getByTestId("forbidden").waitFor();
    await context.close();
  });

  it("an unknown URL shows the app's own not-found page", async () => {
    const context = await browser.newContext(DESKTOP);
    const user = demo("technician");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const res = await page.goto(`${baseURL}/no/such/place`);
    expect(res?.status()).toBe(404);
    await page.getByText("Nothing on this bench").waitFor();
    await context.close();
  });

  it("a job page lists its head and every seat", async () => {
    const context = await browser.newContext(PHONE);
    const user = demo("technician");
    const page = await signIn(context, baseURL, user.email, user.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const res = await page.request.get(`${baseURL}/api/jobs`);
    const { jobs } = (await res.json()) as { jobs: Array<{ id: string; seatCount: number }> };
    const v6 = jobs.find((j) => j.seatCount === 24)!;
    await page.goto(`${baseURL}/jobs/${v6.id}`);
    await page.getByTestId("seat-map").waitFor();
    expect(await page.locator('[data-testid=seat-map] a[href^="/bench/"]').count()).toBe(24);
    await page.getByText("Bank B", { exact: false }).first().waitFor();
    await context.close();
  });
});
