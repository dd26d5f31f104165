// The head report printed as a document, on A4 and on US Letter, read back from the PDF with
// Debian's poppler-utils (pdfinfo, pdftotext): the shop's name, address and phone at the head of
// page 1, "Page i of N" on every page, no nearly empty page before the last, none of the screen's
// words (navigation, buttons, "tap a seat"), and the signature lines at the end. Reads MHW-0141
// (part lapped) and MHW-0143 (every seat settled) and changes nothing.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { REPORT_MARGINS_MM } from "@/components/report/print-css";
import { DESKTOP, launchBrowser, signIn } from "./browser";
import { MM, pdfPageCount, pdfPages } from "./pdf-pages";

const baseURL = inject("baseURL");
let browser: Browser;
let page: Page;
let jobIds: Map<string, string>;
const outDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-report-print-"));

beforeAll(async () => {
  browser = await launchBrowser();
  const context = await browser.newContext(DESKTOP);
  const sup = DEMO_USERS.find((u) => u.role === "supervisor")!;
  page = await signIn(context, baseURL, sup.email, sup.password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  jobIds = new Map(jobs.map((j) => [j.number, j.id]));
});
afterAll(async () => {
  await browser?.close();
  fs.rmSync(outDir, { recursive: true, force: true });
});

/** Fewer than this share of a page's body filled counts as a nearly empty page. */
const NEARLY_EMPTY = 0.15;
// Words of the screen that have no place on paper: the shell's navigation, the buttons, the seat map's hint.
const SCREEN_WORDS = [/tap a seat/i, /Print report/, /Sign out/, /Jobs board/, /Awaiting audit\s{2,}My work/, /Audit trail/, /Specifications\b(?! library)/, /Grindfade/];

describe("the head report on paper", () => {
  for (const number of ["MHW-0141", "MHW-0143"]) {
    for (const format of ["A4", "Letter"] as const) {
      it(`${number} on ${format}: letterhead, page numbers, no nearly empty page, no screen words, signature lines`, async () => {
        await page.goto(`${baseURL}/jobs/${jobIds.get(number)}/report`);
        await expect.poll(() => page.getByTestId("head-report").count()).toBe(1);
        // What the page itself says the shop is; the same words must be on page 1 of the paper.
        const shop = {
          name: (await page.getByTestId("report-shop-name").innerText()).trim(),
          address: (await page.getByTestId("report-shop-address").innerText()).trim(),
          phone: (await page.getByTestId("report-shop-phone").innerText()).replace(/^Phone\s+/, "").trim(),
        };
        // The demo shop (db/seed.ts); other browser tests may change its phone and put it back.
        expect(shop.name).toBe("Millrace Head Works");
        expect(shop.address).toBe("Unit 4, Weir Yard, Lockbridge");
        expect(shop.phone).toMatch(/^[0-9 +()-]{6,}$/);

        const file = path.join(outDir, `${number}-${format}.pdf`);
        await page.pdf({ path: file, format });
        const count = pdfPageCount(file);
        const pages = pdfPages(file, { topPt: REPORT_MARGINS_MM.top * MM, bottomPt: REPORT_MARGINS_MM.bottom * MM });
        expect(pages).toHaveLength(count);
        expect(count).toBeGreaterThanOrEqual(2);

        const first = pages[0]!.text;
        const head = first.split("\n").slice(0, 6).join("\n");
        expect(head).toContain(shop.name);
        expect(head).toContain(shop.address);
        expect(head).toContain(shop.phone);
        expect(first).toContain(number);
        expect(first).toMatch(/CUSTOMER/);

        pages.forEach((p, i) => {
          expect(p.text, `page ${i + 1}`).toMatch(new RegExp(`Page ${i + 1} of ${count}\\b`));
          expect(p.text, `page ${i + 1}`).toContain(`${shop.name} · head report ${number}`);
          for (const w of SCREEN_WORDS) expect(p.text, `page ${i + 1}: ${w}`).not.toMatch(w);
          if (i < count - 1) expect(p.fill, `page ${i + 1} of ${count} is nearly empty`).toBeGreaterThanOrEqual(NEARLY_EMPTY);
        });

        // The signature lines close the report, on its last page.
        const last = pages[count - 1]!.text;
        expect(last).toMatch(/Signed off by:/);
        expect(last).toMatch(/Signature\s{3,}Date/);
        // A heading is never the last thing on a page (it stays with what it heads).
        pages.slice(0, -1).forEach((p, i) => {
          const body = p.text.split("\n").filter((l) => l.trim() && !/Page \d+ of \d+/.test(l));
          expect(body.at(-1)!.trim(), `page ${i + 1} ends with a heading`).not.toMatch(/^(Seats|Journal oil clearance|Cap torque|Other measurements|Done-checks|Contact ring photos|Sign-offs|Cautions|Signature)$/);
        });
      });
    }
  }
});
