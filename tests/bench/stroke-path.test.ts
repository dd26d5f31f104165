// The production server answers stroke saves itself (lib/server/stroke-save.ts), outside Next.js.
// Here it runs in an HTTP server of the test's own on a fresh database, and each request is also
// given to the route handler that `next dev` uses: the two must answer alike (status and body),
// and the server's answers must carry the gate every other answer has — the origin check, the
// security headers and the API's content security policy.
import http from "node:http";
import net from "node:net";
import type { AddressInfo } from "node:net";
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { encode } from "next-auth/jwt";
import { strokes } from "@/db/schema";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { API_POLICY, COMMON_HEADERS } from "@/lib/security/headers";
import { mockAppContext } from "../helpers/app-mocks";
import { NextRequest } from "next/server";
import { BASE_URL, jsonRequest, seatId as findSeat, sessionBody, strokeInputs, userIds } from "./helpers";

const state = mockAppContext();
const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { answerStrokeSave, strokeSaveTarget } = await import("@/lib/server/stroke-save");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const strokesRoute = await import("@/app/api/sessions/[sessionId]/strokes/route");

const SECRET = "stroke-path-test-secret-0123456789";
let server: http.Server;
let base: string;
let ids: Map<string, string>;
const saved = { secret: process.env.NEXTAUTH_SECRET, url: process.env.NEXTAUTH_URL };

async function cookieFor(email: string): Promise<string> {
  const user = ids.get(email)!;
  const role = email.startsWith("admin") ? "admin" : email.startsWith("rhea") ? "supervisor" : "technician";
  return `next-auth.session-token=${await encode({ token: { uid: user, role }, secret: SECRET })}`;
}

async function openSession(email: string, seatCode: string): Promise<string> {
  state.session = { user: { id: ids.get(email)! } };
  const seat = await findSeat(state.t!.db, "MHW-0141", seatCode);
  const body = sessionBody("coarse", "path-test-phone");
  const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
  expect(res.status).toBe(201);
  return body.sessionId;
}

interface Sent {
  email: string | null;
  sessionId: string;
  body: string | Buffer;
  headers?: Record<string, string>;
}

/** The same request to our server and to the route handler: both answers, parsed. */
async function both(sent: Sent) {
  const headers: Record<string, string> = { "content-type": "application/json", origin: base, ...sent.headers };
  if (sent.email) headers.cookie = await cookieFor(sent.email);
  const res = await fetch(`${base}/api/sessions/${sent.sessionId}/strokes`, { method: "POST", headers, body: typeof sent.body === "string" ? sent.body : new Uint8Array(sent.body) });
  const server = { status: res.status, body: await res.json(), headers: res.headers };
  state.session = sent.email ? { user: { id: ids.get(sent.email)! } } : null;
  const req =
    typeof sent.body === "string"
      ? jsonRequest(`/api/sessions/${sent.sessionId}/strokes`, sent.body)
      : new NextRequest(`${BASE_URL}/api/sessions/${sent.sessionId}/strokes`, {
          method: "POST",
          headers: { "content-type": "application/json" },
          body: new Uint8Array(sent.body),
        });
  for (const [k, v] of Object.entries(sent.headers ?? {})) req.headers.set(k, v);
  const routeRes = await strokesRoute.POST(req, { params: Promise.resolve({ sessionId: sent.sessionId }) });
  return { server, route: { status: routeRes.status, body: await routeRes.json() } };
}

// Both as `next dev` keeps PGlite (on the app's thread) and as the production server runs it (on a
// thread of its own, where the save queue's batches are written).
describe.each([
  ["on the app's thread", false],
  ["on a thread of its own", true],
])("stroke saves on the production server's own path, PGlite %s", (_where, thread) => {
  beforeAll(async () => {
    state.t = await freshPglite({ thread });
    await seedDemoShop(state.t.db);
    ids = await userIds(state.t.db);
    server = http.createServer((req, res) => {
      const sessionId = strokeSaveTarget(req.method, req.url);
      if (sessionId === null) {
        res.statusCode = 599; // would have gone to Next.js
        res.end();
        return;
      }
      void answerStrokeSave(req, res, sessionId);
    });
    await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    process.env.NEXTAUTH_SECRET = SECRET;
    process.env.NEXTAUTH_URL = base;
  });
  afterAll(async () => {
    process.env.NEXTAUTH_SECRET = saved.secret;
    process.env.NEXTAUTH_URL = saved.url;
    await new Promise((r) => server?.close(r));
    await state.t?.cleanup();
  });

  it("routes only POST /api/sessions/{id}/strokes to it", () => {
    const id = randomUUID();
    expect(strokeSaveTarget("POST", `/api/sessions/${id}/strokes`)).toBe(id);
    expect(strokeSaveTarget("POST", `/api/sessions/${id}/strokes?x=1`)).toBe(id);
    expect(strokeSaveTarget("GET", `/api/sessions/${id}/strokes`)).toBeNull();
    expect(strokeSaveTarget("POST", `/api/sessions/${id}/strokes/`)).toBeNull();
    expect(strokeSaveTarget("POST", `/api/sessions/${id}/end`)).toBeNull();
    expect(strokeSaveTarget("POST", `/api/sessions/a/b/strokes`)).toBeNull();
    expect(strokeSaveTarget("POST", `/x/api/sessions/${id}/strokes`)).toBeNull();
  });

  it("answers as the route handler does, for saves, resends and refusals", async () => {
    const ines = await openSession("ines@millrace.example", "1I1");
    const [s1, s2] = strokeInputs([11.5, 9.8]);
    const cases: Array<{ sent: Sent; status: number }> = [
      // The server stores it; the route handler then sees it as a resend.
      { sent: { email: "ines@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [s1] }) }, status: 201 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [s1] }) }, status: 200 },
      { sent: { email: null, sessionId: ines, body: JSON.stringify({ strokes: [s2] }) }, status: 401 },
      { sent: { email: "admin@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [s2] }) }, status: 403 },
      { sent: { email: "dov@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [s2] }) }, status: 403 },
      { sent: { email: "ines@millrace.example", sessionId: randomUUID(), body: JSON.stringify({ strokes: [s2] }) }, status: 404 },
      { sent: { email: "ines@millrace.example", sessionId: "not-a-uuid", body: JSON.stringify({ strokes: [s2] }) }, status: 400 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: "{not json" }, status: 400 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [{ ...s2, contrastDb: "NaN" }] }) }, status: 400 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: JSON.stringify({ strokes: [s2] }), headers: { "content-type": "text/plain" } }, status: 415 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: Buffer.alloc(1024 * 1024 + 10, 0x20) }, status: 413 },
      { sent: { email: "ines@millrace.example", sessionId: ines, body: Buffer.from([0x7b, 0xff, 0xfe, 0x7d]) }, status: 400 },
    ];
    for (const { sent, status } of cases) {
      const { server: s, route } = await both(sent);
      expect(s.status, JSON.stringify(s.body)).toBe(status);
      if (status === 201) {
        expect(route.status).toBe(200);
        expect(route.body).toEqual({ ...s.body, accepted: 0, duplicates: 1 });
      } else {
        expect(route).toEqual({ status: s.status, body: s.body });
      }
      expect(typeof s.body.message === "string" || status < 300).toBe(true);
      for (const [k, v] of Object.entries(COMMON_HEADERS)) expect(s.headers.get(k)).toBe(v);
      expect(s.headers.get("content-security-policy")).toBe(API_POLICY);
    }
  });

  it("refuses a save from another site before reading anything, with the gate's message", async () => {
    const ines = await openSession("ines@millrace.example", "1E1");
    const [s1] = strokeInputs([12]);
    for (const origin of ["https://elsewhere.example", null]) {
      const headers: Record<string, string> = { "content-type": "application/json", cookie: await cookieFor("ines@millrace.example") };
      if (origin) headers.origin = origin;
      const res = await fetch(`${base}/api/sessions/${ines}/strokes`, { method: "POST", headers, body: JSON.stringify({ strokes: [s1] }) });
      expect(res.status).toBe(403);
      expect(((await res.json()) as { message: string }).message).toMatch(/Grindfade's own pages/);
      expect(res.headers.get("content-security-policy")).toBe(API_POLICY);
    }
    const stored = await state.t!.db.select().from(strokes).where(eq(strokes.sessionId, ines));
    expect(stored).toEqual([]);
  });

  it("refuses a session whose user id is not one of ours with 401, on both paths", async () => {
    const ines = await openSession("ines@millrace.example", "1I2");
    const [s1] = strokeInputs([12]);
    const forged = `next-auth.session-token=${await encode({ token: { uid: "1; drop table users", role: "technician" }, secret: SECRET })}`;
    const res = await fetch(`${base}/api/sessions/${ines}/strokes`, {
      method: "POST",
      headers: { "content-type": "application/json", origin: base, cookie: forged },
      body: JSON.stringify({ strokes: [s1] }),
    });
    expect(res.status).toBe(401);
    state.session = { user: { id: "1; drop table users" } };
    const routeRes = await strokesRoute.POST(jsonRequest(`/api/sessions/${ines}/strokes`, { strokes: [s1] }), { params: Promise.resolve({ sessionId: ines }) });
    expect(routeRes.status).toBe(401);
  });

  it("lets a phone that drops mid-request go, with nothing saved, logged or left hanging", async () => {
    const ines = await openSession("ines@millrace.example", "2I1");
    const errors = vi.spyOn(console, "error");
    const cookie = await cookieFor("ines@millrace.example");
    const body = JSON.stringify({ strokes: strokeInputs([12, 11]) });
    await new Promise<void>((resolve, reject) => {
      const socket = net.connect((server.address() as AddressInfo).port, "127.0.0.1", () => {
        socket.write(
          `POST /api/sessions/${ines}/strokes HTTP/1.1\r\nHost: 127.0.0.1\r\nOrigin: ${base}\r\nCookie: ${cookie}\r\n` +
            `Content-Type: application/json\r\nContent-Length: ${body.length}\r\n\r\n${body.slice(0, 20)}`,
          () => setTimeout(() => socket.destroy(), 50),
        );
      });
      socket.on("close", () => resolve());
      socket.on("error", reject);
    });
    await new Promise((r) => setTimeout(r, 100));
    expect(errors).not.toHaveBeenCalled();
    errors.mockRestore();
    expect(await state.t!.db.select().from(strokes).where(eq(strokes.sessionId, ines))).toEqual([]);
    // The server still answers the next phone.
    const { server: next } = await both({ email: "ines@millrace.example", sessionId: ines, body });
    expect(next.status).toBe(201);
  });
});
