// The customer's report in the browser, on MHW-0145 (Perrin Ashdown, no e-mail on file): the
// sign-off panel lists what the record lacks and says the report will go to the supervisor only;
// signing off without a reason is refused, with one it goes through and the screen says where the
// report went; the mail in the local catcher carries the public link and the PDF (checked with
// Debian's poppler-utils: pdfinfo, pdftoppm, pdftotext); the link opens the report in a fresh
// browser with no session; revoked by the supervisor, it answers 410 and shows nothing of it.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
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

function mailbox(): string[] {
  const dir = path.join(dataDir, "mail");
  return fs.existsSync(dir) ? fs.readdirSync(dir).filter((f) => f.endsWith(".eml")).map((f) => fs.readFileSync(path.join(dir, f), "utf8")) : [];
}

/** The decoded text/plain part and the PDF attachment of a raw message (nodemailer's MIME). */
function partsOf(raw: string): { text: string; pdf: Buffer } {
  const boundary = /boundary="?([^"\r\n;]+)"?/i.exec(raw)![1]!;
  const parts = raw.split(`--${boundary}`);
  const bodyOf = (part: string) => part.split(/\r?\n\r?\n/).slice(1).join("\n\n");
  // A multipart/alternative inside: look into every part, nested ones included.
  const all = parts.flatMap((p) => {
    const inner = /boundary="?([^"\r\n;]+)"?/i.exec(p);
    return inner ? p.split(`--${inner[1]}`) : [p];
  });
  const textPart = all.find((p) => /Content-Type: text\/plain/i.test(p))!;
  const qp = bodyOf(textPart)
    .replace(/=\r?\n/g, "")
    .replace(/=([0-9A-F]{2})/g, (_, h: string) => String.fromCharCode(parseInt(h, 16)));
  const text = /Content-Transfer-Encoding: quoted-printable/i.test(textPart) ? Buffer.from(qp, "latin1").toString("utf8") : qp;
  const pdfPart = all.find((p) => /Content-Type: application\/pdf/i.test(p))!;
  const pdf = Buffer.from(bodyOf(pdfPart).replace(/\s+/g, ""), "base64");
  return { text, pdf };
}

describe("the customer's report", () => {
  it("signs off MHW-0145 with a reason, mails the link and the PDF, opens without a session, and answers 410 once revoked", async () => {
    const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
    const context = await browser.newContext(DESKTOP);
    const page = await signIn(context, baseURL, sup.email, sup.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
    const job = jobs.find((j) => j.number === "MHW-0145")!; // Perrin Ashdown: no e-mail, every seat settled (db/seed.ts)
    await page.goto(`${baseURL}/jobs/${job.id}`);

    const head = page.getByTestId("head-review-panel");
    await head.waitFor();
    // Before anything is approved the panel lists the seats and the rest of what is missing, and
    // says where the report will go.
    const gaps = head.getByTestId("sign-off-gaps");
    await expect.poll(() => gaps.locator("[data-gap]").evaluateAll((els) => els.map((e) => e.getAttribute("data-gap")))).toEqual([
      "seats",
      "clearance",
      "torque",
      "photos",
    ]);
    expect(await head.getByTestId("sign-off-recipient").innerText()).toBe(
      `Perrin Ashdown has no e-mail on file: the report will go to you only (${sup.email}). Add one under the customer to send it to them.`,
    );
    expect(await head.getByText("Photos: each seat needs at least one contact-ring photo.").count()).toBe(1);

    const panels = page.getByTestId("seat-review-panel");
    const count = await panels.count();
    expect(count).toBe(8);
    for (let i = 0; i < count; i++) {
      const panel = panels.nth(i);
      await panel.locator("textarea[name=comment]").fill("Even grey ring all round; leak test dry.");
      await panel.getByRole("button", { name: "Approve seat" }).click();
      await panel.getByRole("button", { name: "Approve seat" }).waitFor({ state: "detached", timeout: 15_000 });
    }
    await expect.poll(() => gaps.locator("[data-gap]").count()).toBe(3);

    // Without a reason the server refuses, and the head stays awaiting audit.
    await head.locator("textarea[name=comment]").fill("All eight seats approved.");
    await head.getByRole("button", { name: "Sign off the head" }).click();
    await head.getByText(/Give a reason for signing it off anyway/).first().waitFor({ timeout: 15_000 });
    expect(await page.getByTestId("job-status").innerText()).toMatch(/Awaiting audit/);

    const reason = "Walk-in customer collects today; journals and cap torque are done at refit by his own mechanic.";
    await head.locator("textarea[name=comment]").fill("All eight seats approved.");
    await head.getByLabel("Reason for signing off with the record incomplete").fill(reason);
    await head.getByRole("button", { name: "Sign off the head" }).click();
    await page.getByTestId("job-status").getByText("Signed off").waitFor({ timeout: 15_000 });
    expect(await head.getByTestId("head-review-message").innerText()).toBe(
      `Job MHW-0145 signed off. Perrin Ashdown has no e-mail on file: the report went to you only (${sup.email}).`,
    );

    // The staff report prints the reason under the sign-off.
    await page.goto(`${baseURL}/jobs/${job.id}/report`);
    expect(await page.getByTestId("report-incomplete-reason").innerText()).toContain(reason);

    // The mail: to the supervisor alone, greeting the customer, with the public link and the PDF.
    const deadline = Date.now() + 20_000;
    let raw: string | undefined;
    while (Date.now() < deadline && !raw) {
      raw = mailbox().find((m) => /^Subject: Head report MHW-0145: signed off/m.test(m));
      if (!raw) await new Promise((r) => setTimeout(r, 500));
    }
    expect(raw, "the report mail reached the local mailbox").toBeTruthy();
    expect(raw!).toMatch(new RegExp(`^To: ${sup.email.replace(/\./g, "\\.")}\\r?$`, "m"));
    const { text, pdf } = partsOf(raw!);
    expect(text.startsWith("Dear Perrin Ashdown,")).toBe(true);
    const link = new RegExp(`${baseURL.replace(/[.:/]/g, "\\$&")}/r/[A-Za-z0-9_-]{43}`).exec(text)?.[0];
    expect(link, "the public link in the mail").toBeTruthy();
    expect(text).not.toContain(`/jobs/${job.id}/report`);

    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-e2e-pdf-"));
    try {
      const file = path.join(dir, "report.pdf");
      fs.writeFileSync(file, pdf);
      const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync("pdfinfo", [file], { encoding: "utf8" }))![1]);
      expect(pages).toBeGreaterThanOrEqual(2);
      expect(pages).toBeLessThanOrEqual(4);
      execFileSync("pdftoppm", ["-png", "-r", "40", file, path.join(dir, "page")]);
      const images = fs.readdirSync(dir).filter((f) => f.endsWith(".png"));
      expect(images).toHaveLength(pages);
      for (const img of images) expect(fs.statSync(path.join(dir, img)).size).toBeGreaterThan(1000);
      const pdfText = execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
      expect(pdfText).toContain("Millrace Head Works");
      expect(pdfText).toContain("Head report MHW-0145");
      expect(pdfText).toContain(`Page ${pages} of ${pages}`);
      expect(pdfText.replace(/\s+/g, " ")).toContain(reason);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }

    // A fresh browser with no session opens the report: no sign-in form, the job's report only.
    const stranger = await browser.newContext(DESKTOP);
    const visitor = await stranger.newPage();
    const opened = await visitor.goto(link!);
    expect(opened!.status()).toBe(200);
    expect(new URL(visitor.url()).pathname).toBe(new URL(link!).pathname);
    expect(await visitor.locator("input[type=password]").count()).toBe(0);
    await visitor.getByRole("heading", { name: "Head report MHW-0145" }).waitFor();
    await visitor.getByText("Onset contrast", { exact: true }).waitFor();
    expect(await visitor.locator("[data-seat]").count()).toBe(8);
    expect(await visitor.getByText(/Settled at stroke \d+/).count()).toBeGreaterThan(0);
    const body = await visitor.locator("body").innerText();
    for (const other of ["MHW-0141", "MHW-0142", "MHW-0143", "MHW-0144", "Corrin Vale", "Saltmarsh"]) expect(body).not.toContain(other);
    // An altered link is no link.
    const altered = `${link!.slice(0, -1)}${link!.endsWith("A") ? "B" : "A"}`;
    const missing = await visitor.goto(altered);
    expect(missing!.status()).toBe(404);
    expect(await visitor.locator("body").innerText()).toContain("There is no report at this address.");

    // The opening is in the job's audit trail, with nobody as its actor.
    const audit = (await (await page.request.get(`${baseURL}/api/audit?job=${job.id}`)).json()) as {
      entries: Array<{ action: string; actorId: string | null }>;
    };
    expect(audit.entries.filter((e) => e.action === "customer_link.opened").every((e) => e.actorId === null)).toBe(true);
    expect(audit.entries.some((e) => e.action === "customer_link.opened")).toBe(true);

    // The supervisor revokes the link from the job page; it then answers 410 with nothing of the report.
    await page.goto(`${baseURL}/jobs/${job.id}`);
    const links = page.getByTestId("customer-links");
    await links.locator('[data-link-status="live"]').getByText(/Opened once/).waitFor();
    await links.getByRole("button", { name: "Revoke link" }).click();
    await links.getByText("The customer's link to MHW-0145's report is revoked; it no longer opens.").waitFor({ timeout: 15_000 });
    const gone = await visitor.goto(link!);
    expect(gone!.status()).toBe(410);
    const goneText = await visitor.locator("body").innerText();
    expect(goneText).toContain("This report link has been withdrawn by the workshop.");
    expect(goneText).not.toContain("MHW-0145");
    expect(goneText).not.toContain("Perrin");
    const after = (await (await page.request.get(`${baseURL}/api/audit?job=${job.id}`)).json()) as { entries: Array<{ action: string; actorId: string | null }> };
    expect(after.entries.some((e) => e.action === "customer_link.revoked" && e.actorId !== null)).toBe(true);
    await stranger.close();
    await context.close();
  });

  // Runs after the sign-off above, which queued this head's report mail (to the supervisor only:
  // Perrin Ashdown has no e-mail): the admin opens it in the outbox and sees what was sent.
  it("shows the admin the queued report mail in the outbox: kind by name, attempts, the HTML sandboxed, the link readable", async () => {
    const context = await browser.newContext(DESKTOP);
    const admin = DEMO_USERS.find((u) => u.role === "admin")!;
    const page = await signIn(context, baseURL, admin.email, admin.password);
    await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
    await page.goto(`${baseURL}/admin/outbox`);
    const table = page.getByTestId("outbox-table");
    await table.waitFor();
    expect(await table.locator("thead").innerText()).toContain("Sends tried");
    const row = table.locator("tbody tr", { hasText: "MHW-0145" }).first();
    const cells = row.locator("td");
    // No codes: the kind is a name, the status a word; a sent message was tried at least once.
    expect(await cells.nth(1).innerText()).toBe("Head report to customer");
    const status = await cells.nth(4).innerText();
    expect(["Waiting to go", "Going out", "Sent", "Failed"]).toContain(status);
    if (status === "Sent") expect(Number(await cells.nth(5).innerText())).toBeGreaterThanOrEqual(1);
    const subject = await cells.nth(3).innerText();
    expect(subject).toContain("MHW-0145");
    await row.getByRole("link", { name: subject }).click();
    await page.waitForURL(/\/admin\/outbox\?message=[0-9a-f-]{36}#message$/);
    const message = page.getByTestId("outbox-message");
    await message.waitFor();
    expect(await message.getByRole("heading", { level: 2 }).innerText()).toBe(subject);
    // The HTML is shown in a frame with every sandbox restriction (no scripts, no same origin).
    const frame = message.getByTestId("outbox-message-html");
    expect(await frame.getAttribute("sandbox")).toBe("");
    const inside = page.frameLocator('[data-testid="outbox-message-html"]');
    await inside.locator("a").first().waitFor();
    // The report link, readable and openable outside the frame, and the same in the text.
    const link = await message.getByTestId("outbox-message-links").getByRole("link").first().innerText();
    expect(link).toMatch(/^https?:\/\/\S+\/r\/[A-Za-z0-9_-]+$/);
    expect(await inside.locator("a").first().getAttribute("href")).toBe(link);
    await message.getByText("Plain-text version").click();
    expect(await message.getByTestId("outbox-message-text").innerText()).toContain(link);
    await context.close();
  });
});
