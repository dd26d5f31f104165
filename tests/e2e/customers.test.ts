// Customers with a way to reach them, in the browser: a supervisor adds one on the customers
// screen (a bad e-mail first: its message on the field, nothing typed lost), books a job in for
// it, books in another for a new customer typed in the job form with its contact details, and
// edits one; an admin changes the shop's phone (and puts it back) and sees it at the head of the
// report; a technician has no customers screen. New jobs and customers of its own; never the
// shop's name.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
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

const suffix = String(Date.now() % 100_000);
const as = async (role: "supervisor" | "admin" | "technician", options = DESKTOP): Promise<Page> => {
  const user = DEMO_USERS.find((u) => u.role === role)!;
  const page = await signIn(await browser.newContext(options), baseURL, user.email, user.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  return page;
};
const row = (page: Page, name: string) => page.locator(`[data-testid=customer-list] tr[data-customer="${name}"]`);

describe("customers", () => {
  const brackwater = `Brackwater Marine Engines ${suffix}`;
  const gannet = `Gannet Lane Coachworks ${suffix}`;

  it("a supervisor adds a customer with contact details, a bad e-mail refused on its field first", async () => {
    const page = await as("supervisor");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Customers" }).click();
    await page.waitForURL(/\/customers$/);
    const form = page.getByTestId("customer-create-form");
    await form.locator("input[name=name]").fill(brackwater);
    await form.getByLabel("Contact person (optional)").fill("Ysolde Trenk");
    await form.getByLabel("E-mail (optional)").fill("ysolde.brackwater.example");
    await form.getByLabel("Phone (optional)").fill("01632 960 321");
    await form.getByLabel("Address (optional)").fill("Slipway 3, Brackwater Quay");
    await form.getByRole("button", { name: "Add customer" }).click();
    await form.getByText("That does not look like an e-mail address (name@example.com).").waitFor();
    await expect.poll(() => form.getByLabel("E-mail (optional)").getAttribute("aria-invalid")).toBe("true");
    // Nothing typed is lost, and nothing was added.
    expect(await form.locator("input[name=name]").inputValue()).toBe(brackwater);
    expect(await form.getByLabel("Contact person (optional)").inputValue()).toBe("Ysolde Trenk");
    expect(await form.getByLabel("Address (optional)").inputValue()).toBe("Slipway 3, Brackwater Quay");
    expect(await row(page, brackwater).count()).toBe(0);

    await form.getByLabel("E-mail (optional)").fill("ysolde@brackwater.example");
    await form.getByRole("button", { name: "Add customer" }).click();
    await page.getByTestId("customer-form-message").getByText(`${brackwater} added.`).waitFor();
    await row(page, brackwater).waitFor();
    const text = await row(page, brackwater).innerText();
    for (const part of ["Ysolde Trenk", "ysolde@brackwater.example", "01632 960 321", "Slipway 3, Brackwater Quay"]) expect(text).toContain(part);
    expect(await row(page, brackwater).getByTestId("customer-job-count").innerText()).toBe("0");
    await page.context().close();
  });

  it("books a job in for that customer, and the customers screen counts it", async () => {
    const page = await as("supervisor", PHONE);
    await page.goto(`${baseURL}/jobs/new`);
    await page.locator("select[name=customerId]").selectOption({ label: brackwater });
    // A chosen customer needs no new customer's details.
    expect(await page.getByTestId("new-customer-contact").count()).toBe(0);
    await page.getByPlaceholder("Make, model, size, valves").fill("Kessan K16 1.6 inline-4, twin cam, 16 valves (launch engine)");
    await page.getByRole("button", { name: "Book in job" }).tap();
    await page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/, { timeout: 15_000 });
    expect(await page.getByText(brackwater).count()).toBeGreaterThan(0);
    await page.goto(`${baseURL}/customers`);
    expect(await row(page, brackwater).getByTestId("customer-job-count").innerText()).toBe("1");
    await page.context().close();
  });

  it("books in a new customer typed in the job form with its contact details, a bad e-mail refused first", async () => {
    const page = await as("supervisor", PHONE);
    await page.goto(`${baseURL}/jobs/new`);
    await page.getByLabel("New customer's name").fill(gannet);
    await page.getByLabel("Contact person").fill("Pim Carrow");
    await page.getByLabel("Customer's e-mail").fill("pim@gannet");
    await page.getByLabel("Customer's phone").fill("01632 960 654");
    await page.getByLabel("Customer's address").fill("4 Gannet Lane, Lockbridge");
    await page.getByPlaceholder("Make, model, size, valves").fill("Ostrell 2.0 inline-4, single cam, 8 valves");
    await page.getByRole("button", { name: "Book in job" }).tap();
    await page.getByText("That does not look like an e-mail address (name@example.com).").waitFor();
    expect(new URL(page.url()).pathname).toBe("/jobs/new");
    expect(await page.getByLabel("Contact person").inputValue()).toBe("Pim Carrow");
    expect(await page.getByLabel("Customer's address").inputValue()).toBe("4 Gannet Lane, Lockbridge");

    await page.getByLabel("Customer's e-mail").fill("pim@gannet-coachworks.example");
    await page.getByRole("button", { name: "Book in job" }).tap();
    await page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/, { timeout: 15_000 });
    await page.goto(`${baseURL}/customers`);
    const text = await row(page, gannet).innerText();
    for (const part of ["Pim Carrow", "pim@gannet-coachworks.example", "01632 960 654", "4 Gannet Lane, Lockbridge"]) expect(text).toContain(part);
    expect(await row(page, gannet).getByTestId("customer-job-count").innerText()).toBe("1");
    await page.context().close();
  });

  it("a supervisor edits a customer: a bad e-mail refused on its field, then the new phone saved", async () => {
    const page = await as("supervisor");
    await page.goto(`${baseURL}/customers`);
    await row(page, gannet).getByRole("link", { name: gannet }).click();
    await page.waitForURL(/\/customers\/[0-9a-f-]{36}$/);
    const form = page.getByTestId("customer-edit-form");
    await form.getByLabel("E-mail (optional)").fill("pim at gannet");
    await form.getByRole("button", { name: "Save customer" }).click();
    await form.getByText("That does not look like an e-mail address (name@example.com).").waitFor();
    await form.getByLabel("E-mail (optional)").fill("pim@gannet-coachworks.example");
    await form.getByLabel("Phone (optional)").fill("07700 900 654");
    await form.getByRole("button", { name: "Save customer" }).click();
    await page.getByTestId("customer-form-message").getByText(`${gannet} saved.`).waitFor();
    expect(await page.getByTestId("customer-jobs").getByRole("link").count()).toBe(1);
    await page.goto(`${baseURL}/customers`);
    expect(await row(page, gannet).innerText()).toContain("07700 900 654");
    await page.context().close();
  });

  it("a technician has no customers screen", async () => {
    const page = await as("technician");
    expect(await page.getByRole("link", { name: "Customers" }).count()).toBe(0);
    const res = await page.goto(`${baseURL}/customers`);
    expect(res!.status()).toBe(403);
    await page.getByText("Not for your role").first().waitFor();
    await page.context().close();
  });
});

describe("shop details", () => {
  it("an admin changes only the shop's phone, sees it on the report's letterhead, and puts it back", async () => {
    const page = await as("admin");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Shop details" }).click();
    await page.waitForURL(/\/admin\/shop$/);
    const form = page.getByTestId("shop-settings-form");
    const phone = form.getByLabel("Phone");
    const original = await phone.inputValue();
    const name = await form.getByLabel("Shop name").inputValue();
    expect(original).not.toBe("");
    try {
      // A bad phone and a time zone that does not exist: both refused on their fields, nothing saved.
      await phone.fill("ask at the gate");
      const zone = form.getByLabel("Time zone (IANA name)");
      const originalZone = await zone.inputValue();
      await zone.fill("Europe/Lockbridge");
      await form.getByRole("button", { name: "Save shop details" }).click();
      await form.getByText("Use digits, spaces and + ( ) - . only, e.g. 01632 960 414.").waitFor();
      await form.getByText("Use a time zone name like Europe/London or America/Chicago.").waitFor();
      expect(await phone.inputValue()).toBe("ask at the gate");
      await zone.fill(originalZone);

      await phone.fill("01632 960 999");
      await form.getByRole("button", { name: "Save shop details" }).click();
      await page.getByTestId("shop-settings-message").getByText("Shop details saved.").waitFor();

      const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
      await page.goto(`${baseURL}/jobs/${jobs.find((j) => j.number === "MHW-0141")!.id}/report`);
      expect(await page.getByTestId("report-shop-phone").innerText()).toContain("01632 960 999");
      expect(await page.getByTestId("report-shop-name").innerText()).toBe(name);
    } finally {
      await page.goto(`${baseURL}/admin/shop`);
      await page.getByTestId("shop-settings-form").getByLabel("Phone").fill(original);
      await page.getByTestId("shop-settings-form").getByRole("button", { name: "Save shop details" }).click();
      await page.getByTestId("shop-settings-message").getByText(/Shop details saved\.|Nothing changed\./).waitFor();
    }
    await page.reload();
    expect(await page.getByTestId("shop-settings-form").getByLabel("Phone").inputValue()).toBe(original);
    await page.context().close();
  });
});
