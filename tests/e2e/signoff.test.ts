// A supervisor audits a demo head in the browser: approves every seat, signs the head off (giving
// the reason the seeded record needs: no clearances, torque sheet or photos), and the report
// reaches the server's local mailbox with the right recipients, subject and public link.
import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { DESKTOP, launchBrowser, signIn } from "./browser";

const baseURL = inject("baseURL");
const dataDir = inject("dataDir");
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** Undoes quoted-printable soft line breaks, so a long link reads whole. */
function decodeSoftBreaks(raw: string): string {
  return raw.replace(/=\r?\n/g, "").replace(/=3D/g, "=");
}

function mailbox(): string[] {
  const dir = path.join(dataDir, "mail");
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((f) => f.endsWith(".eml")).map((f) => decodeSoftBreaks(fs.readFileSync(path.join(dir, f), "utf8"))) : [];
}

describe("sign-off in the browser", () => {
  it("approves every seat, signs off the head, and mails the report", async () => {
    const context = await browser.newContext(DESKTOP);
    const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
    const page = await signIn(context, baseURL, sup.email, sup.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
    const job = jobs.find((j) => j.number === "MHW-0143")!; // awaiting audit, every seat settled (db/seed.ts)
    await page.goto(`${baseURL}/jobs/${job.id}`);

    const panels = page.getByTestId("seat-review-panel");
    await panels.first().waitFor();
    const count = await panels.count();
    expect(count).toBe(8);
    // The head cannot be signed off while seats are still open.
    expect(await page.getByRole("button", { name: "Sign off the head" }).isDisabled()).toBe(true);
    for (let i = 0; i < count; i++) {
      const panel = panels.nth(i);
      await panel.locator("textarea[name=comment]").fill("Even grey ring all round; leak test dry.");
      await panel.getByRole("button", { name: "Approve seat" }).click();
      await panel.getByRole("button", { name: "Approve seat" }).waitFor({ state: "detached", timeout: 15_000 });
    }
    const head = page.getByTestId("head-review-panel");
    expect(await head.getByTestId("sign-off-recipient").innerText()).toContain("secretary@saltmarsh-vmc.example");
    await head.locator("textarea[name=comment]").fill("All eight seats approved; head signed off.");
    await head.getByLabel("Reason for signing off with the record incomplete").fill("Club measures the journals and torques the caps at refit.");
    await head.getByRole("button", { name: "Sign off the head" }).click();
    await page.getByTestId("job-status").getByText("Signed off").waitFor({ timeout: 15_000 });
    expect(await head.getByTestId("head-review-message").innerText()).toBe("Job MHW-0143 signed off. Report sent to secretary@saltmarsh-vmc.example.");

    // A technician's stroke on a seat of a signed-off head is refused.
    const seatId = await page.locator('[data-testid=seat-map] a[href^="/bench/"]').first().getAttribute("href");
    const refused = await page.request.post(`${baseURL}/api/seats/${seatId!.split("/").pop()}/sessions`, {
      headers: { origin: baseURL },
      data: { sessionId: crypto.randomUUID(), stage: "fine", deviceId: "e2e-device-signoff" },
    });
    expect(refused.status()).toBe(409);

    // The worker sends within a second or two; the catcher writes each message to disk.
    const deadline = Date.now() + 20_000;
    let mail: string | undefined;
    while (Date.now() < deadline && !mail) {
      mail = mailbox().find((m) => m.includes("MHW-0143"));
      if (!mail) await new Promise((r) => setTimeout(r, 500));
    }
    expect(mail, "the report mail reached the local mailbox").toBeTruthy();
    expect(mail!).toMatch(/^Subject: Head report MHW-0143: signed off/m);
    expect(mail!).toContain("secretary@saltmarsh-vmc.example");
    expect(mail!).toContain(sup.email);
    // The customer has no account: the link is the report's public address (tests/e2e/customer-report.test.ts opens one).
    expect(mail!).toMatch(new RegExp(`${baseURL.replace(/[.:/]/g, "\\$&")}/r/[A-Za-z0-9_-]{43}`));
    expect(mail!).not.toContain(`/jobs/${job.id}/report`);
    expect(mail!).toMatch(/Content-Type: application\/pdf; name=head-report-MHW-0143\.pdf/);
    await context.close();
  });

  it("answers a report for a job that does not exist with the app's not-found page", async () => {
    const context = await browser.newContext(DESKTOP);
    const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
    const page = await signIn(context, baseURL, sup.email, sup.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    // The jobs segment streams behind its loading skeleton, so Next has already sent 200 when the
    // page finds no job; what the supervisor gets is the not-found page, marked not to be indexed.
    await page.goto(`${baseURL}/jobs/00000000-0000-4000-8000-000000000000/report`);
    await page.getByText(/no such job|nothing on this bench/i).first().waitFor();
    expect(await page.locator('meta[name="robots"][content*="noindex"]').count()).toBeGreaterThan(0);
    expect(await page.getByTestId("head-report").count()).toBe(0);
    await context.close();
  });
});
