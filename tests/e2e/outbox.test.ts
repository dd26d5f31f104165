// The outbox in the browser: a message that is not the shop's answers a plain sentence. A message
// opened to see what was sent (kinds by name, attempts, the HTML sandboxed, the links) is checked
// where a sign-off queues one: tests/e2e/customer-report.test.ts, after it signs off MHW-0145. The
// unit tests (tests/mail/outbox-view.test.ts, outbox.test.ts) hold the same logic on messages of
// their own.
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
  it("a message that is not the shop's, or not an id at all, answers a plain sentence and shows nothing", async () => {
    for (const id of [randomUUID(), "not-a-message"]) {
      await page.goto(`${baseURL}/admin/outbox?message=${id}`);
      expect(await page.getByTestId("outbox-message-missing").innerText()).toBe("That message is not in your shop's outbox. Choose one from the list below.");
      expect(await page.getByTestId("outbox-message").count()).toBe(0);
    }
  });
});
