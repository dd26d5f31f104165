// Debian's Chromium driven by playwright-core; no browser is ever downloaded. Playwright gives
// every launch a fresh, temporary profile of its own.
import fs from "node:fs";
import { chromium, type Browser, type BrowserContext } from "playwright-core";

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
