// The session recording upload: who may upload, which types and sizes are refused, and that an
// accepted WAV lands in storage byte for byte with the session pointing at it.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { encodeWav } from "@/lib/audio";
import { lappingSessions, seats } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, bodyOf, jsonRequest, seatId as findSeat, sessionBody, userIds } from "./helpers";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
// Storage reads its directory on first use; this test gets one of its own.
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-recording-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");

let ids: Map<string, string>;
let sessionId: string;
const db = () => state.t!.db;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};

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
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

function upload(body: Uint8Array | null, headers: Record<string, string>) {
  const req = new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording`, {
    method: "PUT",
    headers,
    body: body ? Buffer.from(body) : null,
  });
  return recordingRoute.PUT(req, { params: Promise.resolve({ sessionId }) });
}

// A tenth of a second of a 1 kHz tone, 16-bit mono at 8 kHz.
const wav = encodeWav([Float32Array.from({ length: 800 }, (_, i) => 0.3 * Math.sin((2 * Math.PI * 1000 * i) / 8000))], 8000);
const sessionRow = async () => (await db().select().from(lappingSessions).where(eq(lappingSessions.id, sessionId)))[0]!;
const recordingsDir = path.join(dataDir, "blobs", "recordings");
/** The session's files in storage, whole or partial: every upload is kept under a key of its own. */
const filesOf = (id = sessionId) => (fs.existsSync(recordingsDir) ? fs.readdirSync(recordingsDir).filter((f) => f.startsWith(id)) : []);
/** The file the session's row points at. */
const storedFile = async (id = sessionId) => {
  const [row] = await db().select().from(lappingSessions).where(eq(lappingSessions.id, id));
  return path.join(dataDir, "blobs", row!.recordingKey!);
};

describe("recording upload", () => {
  it("refuses anonymous callers with 401 and another technician with 403, storing nothing", async () => {
    signInAs(null);
    expect((await upload(wav, { "content-type": "audio/wav" })).status).toBe(401);
    signInAs("dov@millrace.example");
    expect((await upload(wav, { "content-type": "audio/wav" })).status).toBe(403);
    signInAs("admin@millrace.example");
    expect((await upload(wav, { "content-type": "audio/wav" })).status).toBe(403);
    expect(filesOf()).toEqual([]);
    expect((await sessionRow()).recordingKey).toBeNull();
  });

  it("refuses a body that is not audio with 415", async () => {
    signInAs("ines@millrace.example");
    const res = await upload(new TextEncoder().encode("hello"), { "content-type": "text/plain" });
    expect(res.status).toBe(415);
    expect(await bodyOf(res)).toMatchObject({ error: "unsupported_media_type", message: expect.stringMatching(/MP4\/M4A \(AAC\), WebM, Ogg, MP3 or WAV/) });
  });

  it("refuses a declared size over the limit with 413 before reading the body", async () => {
    signInAs("ines@millrace.example");
    // 64 MB: the route's limit for one session's recording.
    const res = await upload(wav, { "content-type": "audio/webm", "content-length": String(64 * 1024 * 1024 + 1) });
    expect(res.status).toBe(413);
    expect(await bodyOf(res)).toMatchObject({ error: "too_large", message: expect.stringMatching(/64 MB/) });
    expect(filesOf()).toEqual([]);
  });

  it("refuses an undeclared body that grows past the limit with 413, keeping no part of it", async () => {
    signInAs("ines@millrace.example");
    const chunk = new Uint8Array(1024 * 1024);
    // Starts like a real Ogg Opus file, since the route reads the kind from the first bytes.
    const oggOpus = new TextEncoder().encode("OggS\0\x02\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\0\x01\x13OpusHead");
    chunk.set(oggOpus);
    let sent = 0;
    // One byte more than the route's 64 MB limit, in 1 MB pieces, with no content-length.
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent > 64) return controller.close();
        controller.enqueue(sent === 64 ? chunk.subarray(0, 1) : chunk);
        sent++;
      },
    });
    const req = new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording`, {
      method: "PUT",
      headers: { "content-type": "audio/ogg" },
      body: stream,
      duplex: "half",
    } as ConstructorParameters<typeof NextRequest>[1]);
    const res = await recordingRoute.PUT(req, { params: Promise.resolve({ sessionId }) });
    expect(res.status).toBe(413);
    expect(filesOf()).toEqual([]);
  });

  it("refuses an empty recording with 400", async () => {
    signInAs("ines@millrace.example");
    const res = await upload(new Uint8Array(0), { "content-type": "audio/wav" });
    expect(res.status).toBe(400);
    expect((await sessionRow()).recordingKey).toBeNull();
    expect(filesOf()).toEqual([]);
  });

  it("stores a WAV byte for byte and points the session at it", async () => {
    signInAs("ines@millrace.example");
    const res = await upload(wav, { "content-type": "audio/wav" });
    expect(res.status).toBe(201);
    expect(await bodyOf(res)).toEqual({ ok: true, bytes: wav.byteLength });
    expect(new Uint8Array(fs.readFileSync(await storedFile()))).toEqual(wav);
    expect(await sessionRow()).toMatchObject({ recordingKey: `recordings/${filesOf()[0]}`, recordingType: "audio/wav", recordingBytes: wav.byteLength });
    expect(filesOf()).toEqual([expect.stringMatching(/\.wav$/)]);
    // A supervisor may upload for any job of the shop; the upload replaces the earlier one.
    signInAs("rhea@millrace.example");
    const again = await upload(wav.slice(0, 100), { "content-type": "audio/wav; codecs=1" });
    expect(again.status).toBe(201);
    expect(fs.statSync(await storedFile()).size).toBe(100);
    // The recording replaced is gone from storage.
    expect(filesOf()).toHaveLength(1);
    expect((await sessionRow()).recordingBytes).toBe(100);
    // An empty resend is refused and leaves the kept recording as it was.
    expect((await upload(new Uint8Array(0), { "content-type": "audio/wav" })).status).toBe(400);
    expect(new Uint8Array(fs.readFileSync(await storedFile()))).toEqual(wav.slice(0, 100));
    expect(filesOf()).toHaveLength(1);
  });

  it("never replaces or adds a recording once the seat is signed off, late first recordings included", async () => {
    signInAs("ines@millrace.example");
    const seat = await findSeat(db(), "MHW-0141", "4E1");
    const withRecording = sessionBody("coarse", "phone-ines-1");
    const late = sessionBody("fine", "phone-ines-1");
    for (const body of [withRecording, late]) {
      const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
      expect(res.status).toBe(201);
    }
    const put = (id: string, bytes: Uint8Array) =>
      recordingRoute.PUT(
        new NextRequest(`${BASE_URL}/api/sessions/${id}/recording`, { method: "PUT", headers: { "content-type": "audio/wav" }, body: Buffer.from(bytes) }),
        { params: Promise.resolve({ sessionId: id }) },
      );
    expect((await put(withRecording.sessionId, wav)).status).toBe(201);
    // The supervisor signs the seat off.
    await db().update(seats).set({ state: "approved" }).where(eq(seats.id, seat));
    const row = async (id: string) => (await db().select().from(lappingSessions).where(eq(lappingSessions.id, id)))[0]!;
    const kept = await row(withRecording.sessionId);
    for (const who of ["ines@millrace.example", "rhea@millrace.example"]) {
      signInAs(who);
      const res = await put(withRecording.sessionId, wav.slice(0, 200));
      expect(res.status, who).toBe(409);
      expect(((await bodyOf(res)) as { message: string }).message).toMatch(/signed off .* reopen the seat/);
    }
    expect(await row(withRecording.sessionId)).toEqual(kept);
    expect(new Uint8Array(fs.readFileSync(await storedFile(withRecording.sessionId)))).toEqual(wav);
    expect(filesOf(withRecording.sessionId)).toHaveLength(1);
    // The other session, recorded before the sign-off, arrives late from the phone's queue: the
    // record as signed off is not changed; the phone keeps it, refused with the reason.
    signInAs("ines@millrace.example");
    const lateAnswer = await put(late.sessionId, wav);
    expect(lateAnswer.status).toBe(409);
    expect(((await bodyOf(lateAnswer)) as { message: string }).message).toMatch(/signed off before this recording arrived.*stays on the phone/);
    expect((await row(late.sessionId)).recordingKey).toBeNull();
    expect(filesOf(late.sessionId)).toHaveLength(0);
    // Reopened by a supervisor, the seat takes it.
    await db().update(seats).set({ state: "settled" }).where(eq(seats.id, seat));
    expect((await put(late.sessionId, wav)).status).toBe(201);
    expect((await row(late.sessionId)).recordingBytes).toBe(wav.byteLength);
  });
});
