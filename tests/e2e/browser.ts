// Debian's Chromium driven by playwright-core; no browser is ever downloaded. Playwright gives
// every launch a fresh, temporary profile of its own.
import fs from "node:fs";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

export const CHROMIUM_PATH = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

export async function launchBrowser(extraArgs: string[] = []): Promise<Browser> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(`Chromium not found at ${CHROMIUM_PATH}: install Debian's chromium (apt-get install chromium).`);
  }
  return chromium.launch({
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      ...extraArgs,
    ],
  });
}

export const PHONE = { viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true, deviceScaleFactor: 2 };
export const DESKTOP = { viewport: { width: 1366, height: 900 } };

export async function signIn(context: BrowserContext, baseURL: string, email: string, password: string) {
  const page = await context.newPage();
  await page.goto(`${baseURL}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  return page;
}

/**
 * A fresh browser with a demo user signed in at a phone viewport, on the jobs list, and the URL of
 * one demo job's page (looked up by its number through the API).
 */
export async function signedInOnJob(
  baseURL: string,
  email: string,
  password: string,
  jobNumber: string,
  contextOptions: Parameters<Browser["newContext"]>[0] = PHONE,
): Promise<{ browser: Browser; page: Page; jobUrl: string }> {
  const browser = await launchBrowser();
  const context = await browser.newContext(contextOptions);
  const page = await signIn(context, baseURL, email, password);
  await page.waitForURL(/\/jobs(\?mine=1)?$/);
  const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: Array<{ id: string; number: string }> };
  const job = jobs.find((j) => j.number === jobNumber);
  if (!job) throw new Error(`no demo job ${jobNumber}`);
  return { browser, page, jobUrl: `${baseURL}/jobs/${job.id}` };
}
