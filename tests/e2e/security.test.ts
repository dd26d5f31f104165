// Security at the edge of the running production server: response headers, the content
// security policy and its nonce, the same-origin rule for changes, session cookies, and the
// sign-in throttle per address (on a server of its own, so it locks nobody else out).
// Header meanings: W3C CSP Level 3 (script-src nonces, frame-ancestors), RFC 6265bis (HttpOnly,
// SameSite), W3C Referrer Policy.
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import type { Browser } from "playwright-core";
import { DEMO_USERS } from "@/db/seed";
import { launchBrowser, PHONE, signIn } from "./browser";
import { decayingSession } from "./bench-audio";
import { signInOverHttp as httpSignIn } from "./http-sign-in";
import { randomSecret, startServer, type RunningServer } from "./server";

const baseURL = inject("baseURL");
const tech = DEMO_USERS.find((u) => u.email.startsWith("ines"))!;
const supervisor = DEMO_USERS.find((u) => u.role === "supervisor")!;


describe("response headers", () => {
  it("gives every page a content security policy with a fresh nonce that its own scripts carry", async () => {
    const nonces: string[] = [];
    for (let i = 0; i < 2; i++) {
      const res = await fetch(`${baseURL}/sign-in`);
      expect(res.status).toBe(200);
      const csp = res.headers.get("content-security-policy")!;
      expect(csp).toMatch(/frame-ancestors 'none'/);
      expect(csp).toMatch(/object-src 'none'/);
      expect(csp).not.toMatch(/'unsafe-inline'[^;]*;?\s*$|script-src[^;]*'unsafe-inline'/);
      expect(csp).not.toMatch(/script-src[^;]*'unsafe-eval'/);
      const nonce = /script-src[^;]*'nonce-([^']+)'/.exec(csp)?.[1];
      expect(nonce).toBeTruthy();
      nonces.push(nonce!);
      const html = await res.text();
      const scripts = [...html.matchAll(/<script\b([^>]*)>/g)].map((m) => m[1]!);
      expect(scripts.length).toBeGreaterThan(0);
      // Inline scripts need the nonce; scripts from files are this origin's and carry it too.
      for (const attrs of scripts) expect(attrs).toContain(`nonce="${nonce}"`);
    }
    expect(nonces[0]).not.toBe(nonces[1]);
  });

  it("sets the referrer policy, no sniffing, no framing, and no X-Powered-By on pages, API and assets", async () => {
    const page = await fetch(`${baseURL}/sign-in`);
    const html = await page.text();
    const asset = /<script[^>]+src="(\/_next\/static\/[^"]+\.js)"/.exec(html)?.[1];
    expect(asset).toBeTruthy();
    for (const url of [`${baseURL}/sign-in`, `${baseURL}/api/health`, `${baseURL}/api/jobs`, `${baseURL}${asset}`]) {
      const res = await fetch(url, { redirect: "manual" });
      expect(res.headers.get("x-powered-by"), url).toBeNull();
      expect(res.headers.get("referrer-policy"), url).toBe("same-origin");
      expect(res.headers.get("x-content-type-options"), url).toBe("nosniff");
      expect(res.headers.get("x-frame-options"), url).toBe("DENY");
    }
    const api = await fetch(`${baseURL}/api/health`);
    expect(api.headers.get("content-security-policy")).toBe("default-src 'none'; frame-ancestors 'none'");
  });
});

describe("changes only from our own pages", () => {
  it("refuses a change with no origin or a foreign one, before anything else is looked at", async () => {
    const variants: Record<string, string>[] = [{}, { origin: "https://elsewhere.example" }, { origin: baseURL.replace(/:\d+$/, ":1") }];
    for (const headers of variants) {
      const res = await fetch(`${baseURL}/api/jobs`, { method: "POST", headers: { "content-type": "application/json", ...headers }, body: "{}" });
      expect(res.status).toBe(403);
      const body = (await res.json()) as { message: string };
      expect(body.message).toMatch(/own pages/);
    }
    // From its own origin the request reaches the sign-in gate instead.
    const own = await fetch(`${baseURL}/api/jobs`, { method: "POST", headers: { "content-type": "application/json", origin: baseURL }, body: "{}" });
    expect(own.status).toBe(401);
  });

  it("refuses a signed-in technician's forged stroke post and saves nothing", async () => {
    const { cookie: jar } = await httpSignIn(baseURL, tech.email, tech.password);
    const jobs = (await (await fetch(`${baseURL}/api/jobs`, { headers: { cookie: jar } })).json()) as { jobs: { id: string; number: string }[] };
    expect(jobs.jobs.length).toBeGreaterThan(0);
    const sessionId = crypto.randomUUID();
    const forged = await fetch(`${baseURL}/api/sessions/${sessionId}/strokes`, {
      method: "POST",
      headers: { "content-type": "application/json", cookie: jar, origin: "https://elsewhere.example" },
      body: JSON.stringify({ strokes: [] }),
    });
    expect(forged.status).toBe(403);
    // A forged server action post to a page is refused the same way.
    const action = await fetch(`${baseURL}/jobs`, {
      method: "POST",
      headers: { "next-action": "0".repeat(42), cookie: jar, origin: "https://elsewhere.example", "content-type": "text/plain" },
      body: "[]",
    });
    expect(action.status).toBe(403);
  });
});

describe("session cookies", () => {
  it("are HttpOnly and SameSite=Lax, for the session and for the sign-in form's token", async () => {
    const { setCookies, csrfSetCookies: csrfCookies, location } = await httpSignIn(baseURL, supervisor.email, supervisor.password);
    expect(location).not.toMatch(/error=/);
    const session = setCookies.find((c) => /session-token=/.test(c));
    expect(session).toBeTruthy();
    expect(session).toMatch(/;\s*HttpOnly/i);
    expect(session).toMatch(/;\s*SameSite=Lax/i);
    expect(session).toMatch(/;\s*Path=\//i);
    const csrf = csrfCookies.find((c) => /csrf-token=/.test(c));
    expect(csrf).toMatch(/;\s*HttpOnly/i);
    expect(csrf).toMatch(/;\s*SameSite=Lax/i);
  });
});

describe("pages run within their policy", () => {
  let browser: Browser;
  beforeAll(async () => {
    const mic = decayingSession();
    browser = await launchBrowser([
      "--use-fake-device-for-media-stream",
      "--use-fake-ui-for-media-stream",
      `--use-file-for-fake-audio-capture=${mic.path}%noloop`,
    ]);
  });
  afterAll(async () => {
    await browser?.close();
  });

  it("has no policy violation on the board, a job, a review page and the bench while it listens", async () => {
    const context = await browser.newContext({ ...PHONE, permissions: ["microphone"] });
    await context.addInitScript(() => {
      const w = window as unknown as { __violations: string[] };
      w.__violations = [];
      document.addEventListener("securitypolicyviolation", (e) => w.__violations.push(`${e.violatedDirective} ${e.blockedURI}`));
    });
    const violations = async (p: import("playwright-core").Page) =>
      p.evaluate(() => (window as unknown as { __violations: string[] }).__violations);

    const page = await signIn(context, baseURL, supervisor.email, supervisor.password);
    await page.waitForURL(/\/jobs(\?mine=1)?$/);
    expect(await violations(page)).toEqual([]);
    const { jobs } = (await (await page.request.get(`${baseURL}/api/jobs`)).json()) as { jobs: { id: string; number: string }[] };
    const audited = jobs.find((j) => j.number === "MHW-0143")!;
    await page.goto(`${baseURL}/jobs/${audited.id}`);
    await page.getByTestId("seat-map").waitFor();
    expect(await violations(page)).toEqual([]);
    const reviewHref = await page.locator('a[href^="/review/"]').first().getAttribute("href");
    if (reviewHref) {
      await page.goto(`${baseURL}${reviewHref}`);
      await page.waitForLoadState("networkidle");
      expect(await violations(page)).toEqual([]);
    }

    // The bench loads its audio worklet and analysis worker under the policy and starts calibrating.
    const own = jobs.find((j) => j.number === "MHW-0141")!;
    await page.goto(`${baseURL}/jobs/${own.id}`);
    const benchHref = await page.locator('a[href^="/bench/"][aria-label^="Cylinder 4 exhaust 1,"]').first().getAttribute("href");
    await page.goto(`${baseURL}${benchHref}`);
    await page.getByTestId("start-listening").tap();
    await page.getByTestId("calibrating").waitFor({ timeout: 15_000 });
    expect(await violations(page)).toEqual([]);
    await context.close();
  });
});

describe("sign-in throttle per address", () => {
  let server: RunningServer;
  beforeAll(async () => {
    server = await startServer(randomSecret(), {
      GRINDFADE_SIGNIN_MAX_PER_ADDRESS: "4",
      GRINDFADE_SIGNIN_MAX_FAILURES: "50",
    });
  });
  afterAll(async () => {
    await server?.stop();
  });

  it("after a few wrong passwords on different accounts, this address must wait, even with a right password", async () => {
    const others = DEMO_USERS.filter((u) => u.email !== supervisor.email);
    for (let i = 0; i < 4; i++) {
      const who = others[i % others.length]!;
      const { location } = await httpSignIn(server.baseURL, who.email, `not-the-password-${i}`);
      expect(decodeURIComponent(location)).toMatch(/error=invalid\b/);
    }
    const { location, setCookies } = await httpSignIn(server.baseURL, supervisor.email, supervisor.password);
    expect(decodeURIComponent(location)).toMatch(/error=throttled:15\b/);
    expect(setCookies.some((c) => /session-token=/.test(c))).toBe(false);
    // Claiming another address in a header changes nothing: the connection's is the one counted.
    for (const spoof of [{ "x-forwarded-for": "203.0.113.77" }, { "x-real-ip": "203.0.113.78" }, { "x-grindfade-client-address": "guess 203.0.113.79" }] as Array<Record<string, string>>) {
      const again = await httpSignIn(server.baseURL, supervisor.email, supervisor.password, spoof);
      expect(decodeURIComponent(again.location), JSON.stringify(spoof)).toMatch(/error=throttled:\d+\b/);
      expect(again.signedIn).toBe(false);
    }
  });
});
