// The policy strings and the same-origin rule for changes, as pure functions. Directive names
// and their meaning follow the W3C Content Security Policy Level 3 draft and the Fetch standard's
// Origin header (a browser sets it on every cross-origin request and on same-origin POSTs).
import { describe, expect, it } from "vitest";
import { API_POLICY, checkOrigin, COMMON_HEADERS, isMutating, newNonce, pagePolicy } from "@/lib/security/headers";

function directives(policy: string): Map<string, string[]> {
  return new Map(
    policy.split(";").map((d) => {
      const [name, ...values] = d.trim().split(/\s+/);
      return [name!, values];
    }),
  );
}

describe("page policy", () => {
  it("lets scripts run only from this origin or with this response's nonce", () => {
    const d = directives(pagePolicy("abc123"));
    expect(d.get("script-src")).toEqual(["'self'", "'nonce-abc123'"]);
    expect(d.get("script-src")).not.toContain("'unsafe-inline'");
    expect(d.get("script-src")).not.toContain("'unsafe-eval'");
    expect(d.get("frame-ancestors")).toEqual(["'none'"]);
    expect(d.get("object-src")).toEqual(["'none'"]);
    expect(d.get("base-uri")).toEqual(["'self'"]);
    expect(d.get("form-action")).toEqual(["'self'"]);
    expect(d.get("connect-src")).toEqual(["'self'"]);
    // The analysis worker and the offline worker are files of this origin.
    expect(d.get("worker-src")).toContain("'self'");
  });

  it("adds eval only for the development server", () => {
    expect(directives(pagePolicy("n", true)).get("script-src")).toContain("'unsafe-eval'");
  });

  it("gives API answers nothing to run and nothing to frame", () => {
    const d = directives(API_POLICY);
    expect(d.get("default-src")).toEqual(["'none'"]);
    expect(d.get("frame-ancestors")).toEqual(["'none'"]);
  });

  it("makes a different nonce each time, 128 bits in base64", () => {
    const seen = new Set(Array.from({ length: 200 }, () => newNonce()));
    expect(seen.size).toBe(200);
    for (const n of seen) expect(Buffer.from(n, "base64")).toHaveLength(16);
  });

  it("sets a referrer policy, no sniffing and no framing on every response", () => {
    expect(COMMON_HEADERS["Referrer-Policy"]).toBe("same-origin");
    expect(COMMON_HEADERS["X-Content-Type-Options"]).toBe("nosniff");
    expect(COMMON_HEADERS["X-Frame-Options"]).toBe("DENY");
    expect(COMMON_HEADERS["Permissions-Policy"]).toMatch(/microphone=\(self\)/);
  });
});

describe("same-origin rule for changes", () => {
  const base = { hosts: ["shop.example:3000"], referer: null };

  it("lets reads through whatever their origin", () => {
    for (const method of ["GET", "HEAD", "OPTIONS", "get"]) {
      expect(isMutating(method)).toBe(false);
      expect(checkOrigin({ ...base, method, origin: "https://elsewhere.example" }).ok).toBe(true);
    }
  });

  it("takes a change from its own origin", () => {
    for (const method of ["POST", "PUT", "PATCH", "DELETE"]) {
      expect(checkOrigin({ ...base, method, origin: "http://shop.example:3000" })).toEqual({ ok: true });
    }
  });

  it("refuses a change from another site, another port, or an unreadable origin", () => {
    for (const origin of ["https://elsewhere.example", "http://shop.example:3001", "http://shop.example", "not a url"]) {
      const v = checkOrigin({ ...base, method: "POST", origin });
      expect(v.ok).toBe(false);
      if (!v.ok) expect(v.message).toMatch(/own pages/);
    }
  });

  it("refuses a change that names no origin at all, and an opaque origin without a referer", () => {
    for (const origin of [null, "null"]) {
      const v = checkOrigin({ ...base, method: "POST", origin });
      expect(v.ok).toBe(false);
      if (!v.ok) expect(v.message).toMatch(/no Origin header|own pages/);
    }
  });

  it("falls back to a same-origin referer when there is no origin", () => {
    expect(checkOrigin({ ...base, method: "POST", origin: null, referer: "http://shop.example:3000/bench/x" }).ok).toBe(true);
    expect(checkOrigin({ ...base, method: "POST", origin: null, referer: "http://evil.example/shop.example:3000" }).ok).toBe(false);
  });

  it("accepts the forwarded host behind a reverse proxy and the configured public address", () => {
    expect(
      checkOrigin({ method: "POST", origin: "https://heads.example", referer: null, hosts: ["127.0.0.1:3000", "heads.example"] }).ok,
    ).toBe(true);
    expect(
      checkOrigin({
        method: "POST",
        origin: "https://heads.example",
        referer: null,
        hosts: ["127.0.0.1:3000"],
        allowedOrigins: ["https://heads.example"],
      }).ok,
    ).toBe(true);
  });
});
