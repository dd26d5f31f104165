// The outbox in the browser, as the admin reads it: kinds by name, status in words, attempts that
// count sends, and a message opened to see what was sent (recipients, subject, the HTML in a
// sandboxed frame, the text, the links). Only a sign-off queues mail, and this file signs nothing
// off: it reads whatever the other files' sign-offs queued (tests/e2e/signoff.test.ts mails
// MHW-0143's report), and the unit tests (tests/mail/outbox-view.test.ts, outbox.test.ts) hold
// the same logic on messages of their own.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext(DESKTOP);
  const admin = DEMO_USERS.find((u) => u.role === "admin")!;
  page = await signIn(context, baseURL, admin.email, admin.password);
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
});
afterAll(async () => {
  await browser?.close();
});

describe("the outbox", () => {
  it("names kinds and statuses in words; an opened message shows what was sent, its HTML sandboxed", async () => {
    await page.goto(`${baseURL}/admin/outbox`);
    await page.getByRole("heading", { name: "Outbox", level: 1 }).waitFor();
    const table = page.getByTestId("outbox-table");
    if ((await table.count()) === 0) {
      // No file signed off before this one: the empty state says so.
      expect(await page.getByTestId("outbox-empty").innerText()).toContain("Nothing has been sent yet");
      return;
    }
    expect(await table.locator("thead").innerText()).toContain("Sends tried");
    const rows = table.locator("tbody tr");
    const n = await rows.count();
    for (let i = 0; i < n; i++) {
      const cells = rows.nth(i).locator("td");
      // No codes: the kind is a name, the status a word.
      expect(await cells.nth(1).innerText()).toBe("Head report to customer");
      expect(["Waiting to go", "Going out", "Sent", "Failed"]).toContain(await cells.nth(4).innerText());
      // A sent message was tried at least once: attempts count sends, not failures.
      if ((await cells.nth(4).innerText()) === "Sent") expect(Number(await cells.nth(5).innerText())).toBeGreaterThanOrEqual(1);
    }

    const first = rows.first();
    const subject = await first.locator("td").nth(3).innerText();
    const to = await first.locator("td").nth(2).innerText();
    await first.getByRole("link", { name: subject }).click();
    await page.waitForURL(/\/admin\/outbox\?message=[0-9a-f-]{36}#message$/);
    const message = page.getByTestId("outbox-message");
    await message.waitFor();
    expect(await message.getByRole("heading", { level: 2 }).innerText()).toBe(subject);
    expect(await message.getByTestId("outbox-message-to").innerText()).toBe(to);
    expect(await message.getByTestId("outbox-message-status").innerText()).toMatch(/^(Sent|Waiting to go|Going out|Failed)\s+(Sent .* after \d+ attempts?\.|Waiting to go.*|Going out now.*|Not delivered.*)$/);
    // The HTML is shown in a frame with every sandbox restriction (no scripts, no same origin).
    const frame = message.getByTestId("outbox-message-html");
    expect(await frame.getAttribute("sandbox")).toBe("");
    const html = await frame.getAttribute("srcdoc");
    expect(html).toContain("<p>");
    const inside = page.frameLocator('[data-testid="outbox-message-html"]');
    await inside.locator("a").first().waitFor();
    // The message's link (the head report's), readable and openable outside the frame, and the same in the text.
    const links = message.getByTestId("outbox-message-links").getByRole("link");
    expect(await links.count()).toBeGreaterThanOrEqual(1);
    const link = await links.first().innerText();
    expect(link).toMatch(/^https?:\/\/\S+$/);
    expect(await inside.locator("a").first().getAttribute("href")).toBe(link);
    await message.getByText("Plain-text version").click();
    expect(await message.getByTestId("outbox-message-text").innerText()).toContain(link);
  });

  it("a message that is not the shop's, or not an id at all, answers a plain sentence and shows nothing", async () => {
    for (const id of [randomUUID(), "not-a-message"]) {
      await page.goto(`${baseURL}/admin/outbox?message=${id}`);
      expect(await page.getByTestId("outbox-message-missing").innerText()).toBe("That message is not in your shop's outbox. Choose one from the list below.");
      expect(await page.getByTestId("outbox-message").count()).toBe(0);
    }
  });
});
