// The production server at the edges of its input: methods it does not serve, server-action
// bodies the framework cannot read, sign-in cookies it cannot use, and uploads above and below
// the limits (the framework's own body buffer for proxy.ts must not cut a file short). Each answer
// is a 4xx with a sentence, or the upload kept whole. Works on seat 2E2 of MHW-0141.
import { randomUUID } from "node:crypto";
import http from "node:http";
import { describe, expect, inject, it, beforeAll } from "vitest";
import { DEMO_USERS } from "@/db/seed";
import { signInOverHttp } from "./http-sign-in";

const baseURL = inject("baseURL");
const supervisor = DEMO_USERS.find((u) => u.role === "supervisor")!;
let cookie = "";
let jobPath = "";
let seatId = "";

const webmHead = Uint8Array.from([
  0x1a, 0x45, 0xdf, 0xa3, 0x9f, 0x42, 0x86, 0x81, 0x01, 0x42, 0xf7, 0x81, 0x01, 0x42, 0xf2, 0x81, 0x04, 0x42, 0xf3, 0x81, 0x08, 0x42, 0x82, 0x84,
  ...new TextEncoder().encode("webm"),
  0x42, 0x87, 0x81, 0x04, 0x42, 0x85, 0x81, 0x02,
]);
const webm = (bytes: number, fill: number) => {
  const b = new Uint8Array(bytes).fill(fill);
  b.set(webmHead);
  return b;
};

/** fetch refuses TRACE itself; node:http sends any method. */
function rawRequest(method: string, path: string): Promise<{ status: number; allow: string; body: string }> {
  return new Promise((resolve, reject) => {
    const req = http.request(`${baseURL}${path}`, { method, headers: { cookie } }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (c: string) => (body += c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, allow: String(res.headers.allow ?? ""), body }));
    });
    req.on("error", reject);
    req.end();
  });
}

beforeAll(async () => {
  const signedIn = await signInOverHttp(baseURL, supervisor.email, supervisor.password);
  expect(signedIn.signedIn).toBe(true);
  cookie = signedIn.cookie;
  const { jobs } = (await (await fetch(`${baseURL}/api/jobs`, { headers: { cookie } })).json()) as { jobs: Array<{ id: string; number: string }> };
  jobPath = `/jobs/${jobs.find((j) => j.number === "MHW-0141")!.id}`;
  const html = await (await fetch(`${baseURL}${jobPath}`, { headers: { cookie } })).text();
  seatId = /href="\/bench\/([0-9a-f-]{36})[^"]*"[^>]*>(?:(?!<\/a>)[\s\S])*?2E2/.exec(html)![1]!;
});

describe("requests the framework cannot take", () => {
  it("answers methods it does not serve with 405 and a sentence", async () => {
    for (const method of ["TRACE", "PROPFIND"]) {
      for (const path of ["/", "/api/jobs", jobPath]) {
        const res = await rawRequest(method, path);
        expect(res.status, `${method} ${path}`).toBe(405);
        expect(res.allow).toMatch(/GET/);
        expect((JSON.parse(res.body) as { message: string }).message).toMatch(/does not take that method/);
      }
    }
  });

  it("answers a server-action request with a body it cannot read with 400", async () => {
    const bodies: Array<[string, string]> = [
      ["text/plain;charset=UTF-8", ""],
      ["text/plain;charset=UTF-8", "[1,2"],
      ["text/plain;charset=UTF-8", '"x"'],
      ["multipart/form-data; boundary=xyz", "garbage"],
      ["multipart/form-data; boundary=xyz", '--xyz\r\nContent-Disposition: form-data; name="0"\r\n\r\nx\r\n--xyz--\r\n'],
    ];
    for (const [type, body] of bodies) {
      for (const headers of [{ "next-action": "60920433459f91539f3c14bf5f2a0716a58103aa72" }, {}] as Array<Record<string, string>>) {
        if (!type.startsWith("multipart") && !("next-action" in headers)) continue;
        const res = await fetch(`${baseURL}${jobPath}`, { method: "POST", headers: { ...headers, cookie, origin: baseURL, "content-type": type }, body });
        expect(res.status, `${type} ${body}`).toBe(400);
        expect(((await res.json()) as { message: string }).message).toMatch(/Reload the page/);
      }
    }
  });

  it("reads past a malformed or doubled sign-in callback cookie instead of failing", async () => {
    for (const extra of ["next-auth.callback-url=a", "next-auth.callback-url=a; next-auth.callback-url=b"]) {
      for (const path of ["/api/auth/session", "/sign-in", "/api/auth/csrf"]) {
        const res = await fetch(`${baseURL}${path}`, { headers: { cookie: extra }, redirect: "manual" });
        expect(res.status, `${path} ${extra}`).toBeLessThan(400);
      }
    }
  });
});

describe("request ids", () => {
  it("gives every answer an id of its own, whatever the client sent", async () => {
    const ids = new Set<string>();
    for (const path of ["/api/health", "/sign-in", "/api/jobs"]) {
      const res = await fetch(`${baseURL}${path}`, { headers: { "x-request-id": "forged-id" } });
      const id = res.headers.get("x-request-id") ?? "";
      expect(id, path).toMatch(/^[0-9a-f-]{36}$/);
      ids.add(id);
    }
    expect(ids.size).toBe(3);
  });
});

describe("uploads over HTTP", () => {
  it("keeps a 20 MB recording whole, and refuses one over 64 MB sent without a length with 413", async () => {
    const sessionId = randomUUID();
    const started = await fetch(`${baseURL}/api/seats/${seatId}/sessions`, {
      method: "POST",
      headers: { cookie, origin: baseURL, "content-type": "application/json" },
      body: JSON.stringify({ sessionId, stage: "coarse", deviceId: "edge-input-phone" }),
    });
    expect(started.status).toBe(201);
    const whole = webm(20 * 1024 * 1024, 3);
    const put = await fetch(`${baseURL}/api/sessions/${sessionId}/recording`, { method: "PUT", headers: { cookie, origin: baseURL, "content-type": "audio/webm" }, body: whole });
    expect(await put.json()).toEqual({ ok: true, bytes: whole.length });
    const back = new Uint8Array(await (await fetch(`${baseURL}/api/sessions/${sessionId}/recording`, { headers: { cookie } })).arrayBuffer());
    expect(back.length).toBe(whole.length);
    expect(Buffer.compare(Buffer.from(back), Buffer.from(whole))).toBe(0);

    // Streamed with no Content-Length, 66 MB in 1 MB pieces.
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(c) {
        if (sent++ >= 66) return c.close();
        c.enqueue(sent === 1 ? webm(1024 * 1024, 4) : new Uint8Array(1024 * 1024));
      },
    });
    const big = await fetch(`${baseURL}/api/sessions/${sessionId}/recording`, {
      method: "PUT",
      headers: { cookie, origin: baseURL, "content-type": "audio/webm" },
      body: stream,
      duplex: "half",
    } as RequestInit);
    expect(big.status).toBe(413);
    expect(((await big.json()) as { message: string }).message).toMatch(/64 MB/);
    // The whole one is still what is kept.
    const after = new Uint8Array(await (await fetch(`${baseURL}/api/sessions/${sessionId}/recording`, { headers: { cookie } })).arrayBuffer());
    expect(after.length).toBe(whole.length);
  }, 120_000);
});
