// Uploads are kept whole or refused: a photo or recording that arrives shorter than its
// Content-Length, or with another SHA-256 than its Content-Digest (RFC 9530), is refused with
// 400 and nothing of it is kept; two uploads of one recording at the same moment never share a
// temporary file, never mix and never answer 500, and the session ends up with one whole upload.
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { lappingSessions, seatPhotos } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, jsonRequest, seatId as findSeat, sessionBody, userIds } from "../bench/helpers";
import { concat, ebmlHeader, jpegHead } from "./fixtures";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-intact-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { LocalDiskStore } = await import("@/lib/storage");
const photosRoute = await import("@/app/api/seats/[seatId]/photos/route");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");
const chunksRoute = await import("@/app/api/sessions/[sessionId]/recording/chunks/route");
const { uploadInChunks } = await import("@/lib/storage/chunked-upload");

let seat: string;
let sessionId: string;
const db = () => state.t!.db;
const sha256 = (b: Uint8Array) => `sha-256=:${createHash("sha256").update(b).digest("base64")}:`;
/** Every file under the data directory's blobs, partial ones included. */
const allFiles = (dir = path.join(dataDir, "blobs")): string[] =>
  fs.existsSync(dir) ? fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? allFiles(path.join(dir, e.name)) : [path.join(dir, e.name)])) : [];
const recordingFiles = () => allFiles().filter((f) => f.includes(`${path.sep}recordings${path.sep}${sessionId}`));
const sessionRow = async () => (await db().select().from(lappingSessions).where(eq(lappingSessions.id, sessionId)))[0]!;

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const ids = await userIds(state.t.db);
  state.session = { user: { id: ids.get("ines@millrace.example")! } };
  seat = await findSeat(state.t.db, "MHW-0141", "4I1");
  const body = sessionBody("coarse", "phone-ines-intact");
  expect((await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) })).status).toBe(201);
  sessionId = body.sessionId;
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

const send = (route: "photo" | "recording", body: Uint8Array, headers: Record<string, string> = {}) => {
  const target = route === "photo" ? `/api/seats/${seat}/photos` : `/api/sessions/${sessionId}/recording`;
  const req = new NextRequest(`${BASE_URL}${target}`, { method: route === "photo" ? "POST" : "PUT", headers, body: Buffer.from(body) });
  return route === "photo" ? photosRoute.POST(req, { params: Promise.resolve({ seatId: seat }) }) : recordingRoute.PUT(req, { params: Promise.resolve({ sessionId }) });
};

const jpeg = concat(jpegHead, Uint8Array.from({ length: 4000 }, (_, i) => (i * 11) & 0xff));
const webm = (fill: number, length = 300_000) => concat(ebmlHeader(), new Uint8Array(length).fill(fill));

describe("uploads whole or refused", () => {
  it("refuses a photo shorter than its Content-Length or with another digest, keeping nothing", async () => {
    const cut = await send("photo", jpeg.subarray(0, 3000), { "content-length": String(jpeg.length) });
    expect(cut.status).toBe(400);
    expect(await cut.json()).toMatchObject({ error: "bad_request", message: expect.stringMatching(/3000 of its 4\d{3} bytes/) });
    const changed = await send("photo", jpeg, { "content-digest": sha256(jpeg.subarray(1)) });
    expect(changed.status).toBe(400);
    expect((await send("photo", jpeg, { "content-digest": "md5=:abc:" })).status).toBe(400);
    expect((await send("photo", jpeg, { "content-length": "12abc" })).status).toBe(400);
    expect(allFiles()).toEqual([]);
    expect(await db().select().from(seatPhotos)).toEqual([]);
    // The same photo, whole and with its digest, is kept.
    const whole = await send("photo", jpeg, { "content-length": String(jpeg.length), "content-digest": sha256(jpeg) });
    expect(whole.status).toBe(201);
    expect(await db().select().from(seatPhotos)).toHaveLength(1);
  });

  it("refuses a recording shorter than its Content-Length or with another digest, keeping the one before", async () => {
    const first = webm(1, 1000);
    expect((await send("recording", first, { "content-digest": sha256(first) })).status).toBe(201);
    const kept = await sessionRow();
    const next = webm(2, 1000);
    expect((await send("recording", next.subarray(0, 900), { "content-length": String(next.length) })).status).toBe(400);
    expect((await send("recording", next, { "content-digest": sha256(first) })).status).toBe(400);
    expect(await sessionRow()).toEqual(kept);
    expect(recordingFiles()).toHaveLength(1);
    expect(new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", kept.recordingKey!)))).toEqual(first);
  });

  it("keeps one whole upload of two sent at the same moment, with no temporary file left", async () => {
    const [a, b] = [webm(0xaa), webm(0xbb)];
    const answers = await Promise.all([send("recording", a), send("recording", b), send("recording", a), send("recording", b)]);
    for (const res of answers) expect([201, 409]).toContain(res.status);
    const row = await sessionRow();
    const stored = new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", row.recordingKey!)));
    expect([a, b].some((x) => Buffer.compare(Buffer.from(x), Buffer.from(stored)) === 0)).toBe(true);
    expect(row.recordingBytes).toBe(stored.length);
    expect(recordingFiles()).toEqual([path.join(dataDir, "blobs", row.recordingKey!)]);
  });

  it("takes two chunked uploads of one recording at the same moment without mixing them", async () => {
    const blob = webm(0x5c, 5000);
    const chunkedFetch = (async (input: RequestInfo | URL, init?: RequestInit) => {
      const req = new NextRequest(String(input), { ...init, duplex: "half" } as ConstructorParameters<typeof NextRequest>[1]);
      const params = { params: Promise.resolve({ sessionId }) };
      return req.method === "GET" ? chunksRoute.GET(req, params) : chunksRoute.PUT(req, params);
    }) as typeof fetch;
    const url = `${BASE_URL}/api/sessions/${sessionId}/recording/chunks`;
    const both = await Promise.allSettled([
      uploadInChunks(url, new Blob([blob]), { chunkBytes: 700, fetchFn: chunkedFetch, retryDelayMs: () => 1 }),
      uploadInChunks(url, new Blob([blob]), { chunkBytes: 1100, fetchFn: chunkedFetch, retryDelayMs: () => 1 }),
    ]);
    expect(both.filter((r) => r.status === "fulfilled").length).toBeGreaterThanOrEqual(1);
    for (const r of both) if (r.status === "rejected") expect(String(r.reason)).not.toMatch(/500/);
    const row = await sessionRow();
    expect(new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", row.recordingKey!)))).toEqual(blob);
    expect(recordingFiles()).toHaveLength(1);
  });

  it("never mixes two writes of one key on disk, and leaves no temporary file", async () => {
    const store = new LocalDiskStore(path.join(dataDir, "race"));
    const bodies = [0x11, 0x22, 0x33, 0x44].map((v) => new Uint8Array(2_000_000).fill(v));
    const streamOf = (b: Uint8Array) =>
      new ReadableStream<Uint8Array>({
        start(c) {
          for (let at = 0; at < b.length; at += 65536) c.enqueue(b.subarray(at, at + 65536));
          c.close();
        },
      });
    await Promise.all(bodies.map((b) => store.put("recordings/same.webm", streamOf(b))));
    const stored = fs.readFileSync(path.join(dataDir, "race", "recordings", "same.webm"));
    expect(stored.length).toBe(2_000_000);
    expect(new Set(stored).size).toBe(1);
    expect(fs.readdirSync(path.join(dataDir, "race", "recordings"))).toEqual(["same.webm"]);
  });
});
