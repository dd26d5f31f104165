// The cap torque unit trap on a phone: choosing lbf·in beside a typed 10 N·m converts the figure,
// a final torque far from the specification is refused until confirmed by its figures in N·m, and
// stages given as torques set up a sheet whose every bolt shows its place in the order. Uses the
// second camshaft of MHW-0141 and ticks nothing (tests/e2e/sheets.test.ts works the first).
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { signedInOnJob } from "./browser";

const baseURL = inject("baseURL");
let browser: Browser;
let page: Page;
let jobUrl: string;

beforeAll(async () => {
  const tech = DEMO_USERS.find((u) => u.email.startsWith("ines"))!;
  ({ browser, page, jobUrl } = await signedInOnJob(baseURL, tech.email, tech.password, "MHW-0141"));
});
afterAll(async () => {
  await browser?.close();
});

describe("cap torque set-up on a phone", () => {
  it("converts on a unit change, asks to confirm a torque far from the specification, and numbers every bolt", async () => {
    await page.goto(`${jobUrl}/torque`);
    const camshaft = page.locator("section[aria-label]").filter({ has: page.getByTestId("torque-setup") }).last();
    const setup = camshaft.getByTestId("torque-setup");
    await setup.waitFor();
    const final = setup.locator("input[name=finalTorque]");
    // Prefilled from the demo specification, 10 N·m (invented, db/seed.ts).
    expect(await final.inputValue()).toBe("10");
    // 10 N·m = 88.51 lbf·in (NIST SP 811: 1 lbf·in = 0.1129848 N·m): the torque stays, the figure changes.
    await setup.locator("select[name=finalTorqueUnit]").selectOption("lbf·in");
    expect(await final.inputValue()).toBe("88.51");
    expect(await setup.getByTestId("final-torque-nm").innerText()).toMatch(/^Final: 10\.0 N·m/);

    // The trap itself: 10 typed with lbf·in chosen is 1.1 N·m.
    await final.fill("10");
    const warning = setup.getByTestId("confirm-deviation");
    await warning.waitFor();
    expect(await setup.getByRole("alert").innerText()).toMatch(/1\.1 N·m .*10\.0 N·m/);
    await setup.getByRole("button", { name: /set up the sheet/i }).tap();
    // The server's answer, not the warning the form already shows.
    await setup.locator("p[aria-live]", { hasText: /^A final torque of 1\.1 N·m is 89 % below the specification's 10\.0 N·m/ }).waitFor({ timeout: 15_000 });
    expect(await camshaft.getByTestId("torque-sheet").count()).toBe(0);

    // Back to N·m: the figure converts again (10 lbf·in = 1.13 N·m); the maker's 10 N·m needs no confirmation.
    await setup.locator("select[name=finalTorqueUnit]").selectOption("N·m");
    expect(await final.inputValue()).toBe("1.13");
    await final.fill("10");
    expect(await warning.count()).toBe(0);
    await setup.locator("select[name=stageMode]").selectOption("torques");
    await setup.locator("input[name=stageTorques]").fill("4");
    await setup.getByRole("button", { name: /set up the sheet/i }).tap();
    const sheet = camshaft.getByTestId("torque-sheet");
    await sheet.waitFor({ timeout: 15_000 });
    expect(await sheet.getByRole("heading", { level: 4 }).allInnerTexts()).toEqual([
      expect.stringMatching(/^Stage 1: .* 4\.0 N·m/),
      expect.stringMatching(/^Stage 2: .* 10\.0 N·m/),
    ]);
    // Every bolt carries its place in the order before it is ticked: centre-out on five caps starts at cap 3.
    expect(await sheet.getByTestId("tick-1-C3-L").innerText()).toBe("1. C3-L");
    expect(await sheet.getByTestId("tick-2-C5-R").innerText()).toBe("10. C5-R");
    // No bolt is ticked yet, so the set-up can still be changed.
    expect(await sheet.getByTestId("change-setup").count()).toBe(1);
    // The cautions stay beside the sheet.
    expect(await page.getByRole("complementary", { name: "Cautions" }).innerText()).toMatch(/calibrated torque wrench/);
  });
});
