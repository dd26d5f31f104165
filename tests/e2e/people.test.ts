// Someone leaves: the admin adds a person of their own for this test (never a demo person other
// files sign in as), that person signs in in a second browser, the admin deactivates them and the
// second browser is refused on its next page; then the admin lets them back in. The people list
// is a table the filter narrows.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
let adminContext: BrowserContext;
let admin: Page;

const stamp = Date.now();
const leaver = { name: "Pell Garrow", email: `leaver-${stamp}@millrace.example`, password: "a valve spring compressor on the bench" };

beforeAll(async () => {
  browser = await launchBrowser();
  adminContext = await browser.newContext(DESKTOP);
  const a = DEMO_USERS.find((u) => u.role === "admin")!;
  admin = await signIn(adminContext, baseURL, a.email, a.password);
  await admin.waitForURL(/\/jobs(\?mine=1)?$/);
});
afterAll(async () => {
  await browser?.close();
});

const table = () => admin.getByTestId("people-table");
const filter = () => admin.getByRole("search", { name: "Filter people" });
const rowOf = (email: string) => table().locator(`tr[data-person="${email}"]`);

describe("people who leave", () => {
  it("the admin adds a person, who signs in in a second browser; the table shows their last sign-in", async () => {
    await admin.goto(`${baseURL}/admin/people`);
    const form = admin.locator("form", { has: admin.getByRole("button", { name: "Add person" }) });
    await form.getByLabel("Name", { exact: true }).fill(leaver.name);
    await form.getByLabel("E-mail", { exact: true }).fill(leaver.email);
    await form.locator("select[name=role]").selectOption("technician");
    await form.getByLabel("First password").fill(leaver.password);
    await form.getByRole("button", { name: "Add person" }).click();
    await rowOf(leaver.email).waitFor();
    expect(await rowOf(leaver.email).innerText()).toContain("Never");

    const other = await browser.newContext(DESKTOP);
    const page = await signIn(other, baseURL, leaver.email, leaver.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    await expect(page.getByTestId("signed-in-as").innerText()).resolves.toContain(leaver.name);

    await admin.reload();
    await rowOf(leaver.email).waitFor();
    const text = await rowOf(leaver.email).innerText();
    expect(text).not.toContain("Never");
    expect(text).toMatch(/\d{1,2} \w{3} \d{4}, \d{2}:\d{2}/);
    await other.close();
  });

  it("the filter narrows the table by name or e-mail, role and status", async () => {
    await admin.goto(`${baseURL}/admin/people`);
    await rowOf(leaver.email).waitFor();
    const count = admin.getByTestId("people-count");
    const all = Number((await count.innerText()).match(/of (\d+)/)![1]);
    expect(all).toBeGreaterThanOrEqual(5);
    await filter().getByLabel("Name or e-mail").fill(`leaver-${stamp}`);
    await expect.poll(() => table().locator("tbody tr[data-person]").count()).toBe(1);
    expect(await count.innerText()).toBe(`Showing 1 of ${all}`);
    await filter().getByLabel("Name or e-mail").fill("pell");
    // "Pell Garrow" by name and the demo admin Tobin Pell: both match, nobody else.
    await expect.poll(() => table().locator("tbody tr[data-person]").count()).toBeGreaterThanOrEqual(2);
    await filter().getByLabel("Role").selectOption("admin");
    await expect.poll(() => rowOf(leaver.email).count()).toBe(0);
    expect(await rowOf("admin@millrace.example").count()).toBe(1);
    await filter().getByLabel("Name or e-mail").fill("nobody-by-this-name");
    await admin.getByText("Nobody matches the filter.").waitFor();
    await filter().getByLabel("Name or e-mail").fill("");
    await filter().getByLabel("Role").selectOption("");
    await expect.poll(async () => (await count.innerText()) === `Showing ${all} of ${all}`).toBe(true);
  });

  it("deactivating ends the second browser's session on its next page load; reactivating lets them sign in again", async () => {
    const other = await browser.newContext(DESKTOP);
    const page = await signIn(other, baseURL, leaver.email, leaver.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);

    await admin.goto(`${baseURL}/admin/people`);
    await admin.getByRole("button", { name: `Manage ${leaver.name}` }).click();
    await admin.getByRole("button", { name: "Deactivate…" }).click();
    await admin.getByRole("button", { name: `Yes, deactivate ${leaver.name}` }).click();
    await admin.getByText(`${leaver.name} is deactivated`).waitFor();
    await expect.poll(() => rowOf(leaver.email).innerText()).toContain("Inactive (left)");

    // The signed-in browser is refused on its very next request: the page and the API.
    await page.reload();
    await page.waitForURL(/\/sign-in/);
    expect((await page.request.get(`${baseURL}/api/jobs`)).status()).toBe(401);
    // And the right password no longer signs them in.
    await page.getByLabel("E-mail").fill(leaver.email);
    await page.getByLabel("Password").fill(leaver.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByTestId("sign-in-error").waitFor();

    // The status filter finds them among the inactive.
    await filter().getByLabel("Status").selectOption("inactive");
    await expect.poll(() => rowOf(leaver.email).count()).toBe(1);
    expect(await rowOf("admin@millrace.example").count()).toBe(0);
    await filter().getByLabel("Status").selectOption("");

    // An admin cannot deactivate themselves: there is no button for it.
    await admin.getByRole("button", { name: "Manage Tobin Pell" }).click();
    await admin.getByText("This is you: another admin must deactivate you").waitFor();

    await admin.getByRole("button", { name: `Manage ${leaver.name}` }).click();
    await admin.getByRole("button", { name: "Reactivate" }).click();
    await admin.getByText(`${leaver.name} can sign in again.`).waitFor();
    await expect.poll(() => rowOf(leaver.email).innerText()).not.toContain("Inactive");

    const again = await signIn(other, baseURL, leaver.email, leaver.password);
    await again.waitForURL(/\/jobs(\?mine=1)?$/);
    expect((await again.request.get(`${baseURL}/api/jobs`)).status()).toBe(200);
    await other.close();
  });
});
