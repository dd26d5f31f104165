// Resumable recording upload: chunks with Content-Range, the status a resuming client asks for,
// gaps refused, a resent chunk acknowledged, and the assembled file stored byte for byte. The
// client helper is driven through the real route with a fetch that drops connections.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { lappingSessions } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, bodyOf, jsonRequest, seatId as findSeat, sessionBody, userIds } from "../bench/helpers";
import { concat, ebmlHeader, pngHead } from "./fixtures";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-chunks-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const chunksRoute = await import("@/app/api/sessions/[sessionId]/recording/chunks/route");
const { uploadInChunks, UploadRefusedError } = await import("@/lib/storage/chunked-upload");

let ids: Map<string, string>;
let sessionId: string;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};
const url = () => `${BASE_URL}/api/sessions/${sessionId}/recording/chunks`;
const params = () => ({ params: Promise.resolve({ sessionId }) });
const sessionRow = async () => (await state.t!.db.select().from(lappingSessions).where(eq(lappingSessions.id, sessionId)))[0]!;
const uploads = () => path.join(dataDir, "blobs", "uploads", "recordings", sessionId);
const leftovers = () => (fs.existsSync(uploads()) ? fs.readdirSync(uploads()) : []);

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ids = await userIds(state.t.db);
  signInAs("ines@millrace.example");
  const seat = await findSeat(state.t.db, "MHW-0141", "4I1");
  const body = sessionBody("coarse", "phone-ines-1");
  const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
  expect(res.status).toBe(201);
  sessionId = body.sessionId;
});
beforeEach(() => signInAs("ines@millrace.example"));
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

/** A WebM recording of 2500 bytes: a real EBML header, then a pattern that shows any shift. */
const recording = concat(ebmlHeader(), Uint8Array.from({ length: 2500 - ebmlHeader().length }, (_, i) => (i * 7 + 3) & 0xff));

function putChunk(data: Uint8Array, start: number, total = data.length, slice = data.subarray(start, start + 1000)) {
  const req = new NextRequest(url(), {
    method: "PUT",
    headers: { "content-range": `bytes ${start}-${start + slice.length - 1}/${total}` },
    body: Buffer.from(slice),
  });
  return chunksRoute.PUT(req, params());
}
const status = async () => bodyOf(await chunksRoute.GET(new NextRequest(url()), params()));

describe("chunked recording upload", () => {
  it("refuses another technician with 403 and a missing Content-Range with 400", async () => {
    signInAs("dov@millrace.example");
    expect((await putChunk(recording, 0)).status).toBe(403);
    expect((await chunksRoute.GET(new NextRequest(url()), params())).status).toBe(403);
    signInAs("ines@millrace.example");
    const res = await chunksRoute.PUT(new NextRequest(url(), { method: "PUT", body: Buffer.from(recording) }), params());
    expect(res.status).toBe(400);
    expect(await status()).toEqual({ received: 0, total: null });
  });

  it("takes three chunks with the middle one resent, refuses a gap and stores the file byte for byte", async () => {
    expect(await putChunk(recording, 0).then(bodyOf)).toEqual({ received: 1000, total: 2500 });
    // The middle chunk arrives but its reply is lost; the client asks and learns it is there.
    expect((await putChunk(recording, 1000)).status).toBe(200);
    expect(await status()).toEqual({ received: 2000, total: 2500 });
    const head = await chunksRoute.HEAD(new NextRequest(url(), { method: "HEAD" }), params());
    expect([head.headers.get("upload-offset"), head.headers.get("upload-length")]).toEqual(["2000", "2500"]);
    // Resending it anyway is harmless.
    expect(await putChunk(recording, 1000).then(bodyOf)).toEqual({ received: 2000, total: 2500 });
    // A chunk past the end of what arrived would leave a gap.
    const gap = await putChunk(recording, 2400, 2500, recording.subarray(2400));
    expect(gap.status).toBe(409);
    expect(await bodyOf(gap)).toMatchObject({ error: "conflict", expectedOffset: 2000, message: expect.stringMatching(/byte 2000/) });
    expect((await sessionRow()).recordingKey).toBeNull();

    const last = await putChunk(recording, 2000, 2500, recording.subarray(2000));
    expect(last.status).toBe(201);
    expect(await bodyOf(last)).toEqual({ ok: true, bytes: 2500 });
    expect(await sessionRow()).toMatchObject({ recordingKey: expect.stringMatching(new RegExp(`^recordings/${sessionId}-[0-9a-f-]{36}\\.webm$`)), recordingType: "audio/webm", recordingBytes: 2500 });
    expect(new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", (await sessionRow()).recordingKey!)))).toEqual(recording);
    expect(leftovers()).toEqual([]);
    expect(await status()).toEqual({ received: 0, total: null });
  });

  it("refuses a first chunk that is not audio with 415, a total over the limit with 413 and a short chunk with 400", async () => {
    const png = concat(pngHead, new Uint8Array(2000));
    expect((await putChunk(png, 0)).status).toBe(415);
    expect(leftovers()).toEqual([]);
    const big = await putChunk(recording, 0, 64 * 1024 * 1024 + 1);
    expect(big.status).toBe(413);
    // The range says 1000 bytes, the body brings 10.
    const req = new NextRequest(url(), { method: "PUT", headers: { "content-range": "bytes 0-999/2500" }, body: Buffer.from(recording.subarray(0, 10)) });
    expect((await chunksRoute.PUT(req, params())).status).toBe(400);
    expect(await status()).toEqual({ received: 0, total: null });
  });
});

/** A fetch into the real route handlers, which can lose a request before or after the server handles it. */
function routeFetch(drop: (n: number, init: RequestInit) => "before" | "after" | null) {
  let n = 0;
  const calls: string[] = [];
  const fetchFn = (async (input: RequestInfo | URL, init: RequestInit = {}) => {
    const method = init.method ?? "GET";
    const call = ++n;
    calls.push(`${method} ${new Headers(init.headers).get("content-range") ?? ""}`.trim());
    const when = drop(call, init);
    if (when === "before") throw new TypeError("network connection was lost");
    const body = init.body instanceof Blob ? Buffer.from(await init.body.arrayBuffer()) : null;
    const req = new NextRequest(String(input), { method, headers: init.headers, body });
    const handler = method === "PUT" ? chunksRoute.PUT : chunksRoute.GET;
    const res = await handler(req, params());
    if (when === "after") throw new TypeError("network connection was lost");
    return res;
  }) as typeof fetch;
  return { fetchFn, calls };
}

describe("uploadInChunks", () => {
  const blob = () => new Blob([recording]);

  it("resumes after a lost reply and a lost request, and the stored file is byte-exact", async () => {
    const { fetchFn, calls } = routeFetch((n) => (n === 3 ? "after" : n === 5 ? "before" : null));
    const result = await uploadInChunks(url(), blob(), { chunkBytes: 1000, fetchFn, retryDelayMs: () => 0 });
    expect(result).toEqual({ bytes: 2500 });
    expect(calls).toEqual([
      "GET",
      "PUT bytes 0-999/2500",
      "PUT bytes 1000-1999/2500", // handled, reply lost
      "GET", // the server has 2000
      "PUT bytes 2000-2499/2500", // lost before it arrived
      "GET",
      "PUT bytes 2000-2499/2500",
    ]);
    expect(new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", (await sessionRow()).recordingKey!)))).toEqual(recording);
  });

  it("picks up an upload left unfinished by an earlier page", async () => {
    expect((await putChunk(recording, 0)).status).toBe(200);
    const { fetchFn, calls } = routeFetch(() => null);
    expect(await uploadInChunks(url(), blob(), { chunkBytes: 1000, fetchFn })).toEqual({ bytes: 2500 });
    expect(calls).toEqual(["GET", "PUT bytes 1000-1999/2500", "PUT bytes 2000-2499/2500"]);
  });

  it("stops at a refusal instead of retrying, and gives up after the allowed retries", async () => {
    const png = new Blob([concat(pngHead, new Uint8Array(2000))]);
    const refused = uploadInChunks(url(), png, { chunkBytes: 1000, fetchFn: routeFetch(() => null).fetchFn });
    await expect(refused).rejects.toBeInstanceOf(UploadRefusedError);
    await expect(refused).rejects.toMatchObject({ status: 415 });
    const offline = routeFetch(() => "before");
    await expect(uploadInChunks(url(), blob(), { fetchFn: offline.fetchFn, maxRetries: 2, retryDelayMs: () => 0 })).rejects.toThrow(/after 2 retries/);
    expect(offline.calls).toEqual(["GET", "GET", "GET"]);
  });
});
