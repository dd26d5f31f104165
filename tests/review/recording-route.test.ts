// Playing a session's recording back: the whole file, one byte range for seeking, a range past
// the end refused, and only for people of the session's own shop.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { encodeWav } from "@/lib/audio";
import { shops, users } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, bodyOf, jsonRequest, seatId as findSeat, sessionBody, userIds } from "../bench/helpers";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
// Storage reads its directory on first use; this test gets one of its own.
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-playback-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");

let ids: Map<string, string>;
let recorded: string;
let unrecorded: string;
const signInAs = (email: string | null) => {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
};

// A fifth of a second of a 440 Hz tone, 16-bit mono at 8 kHz: 44 header bytes + 3200 of samples.
const wav = encodeWav([Float32Array.from({ length: 1600 }, (_, i) => 0.25 * Math.sin((2 * Math.PI * 440 * i) / 8000))], 8000);

async function startSession(seat: string, deviceId: string): Promise<string> {
  const body = sessionBody("coarse", deviceId);
  const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
  expect(res.status).toBe(201);
  return body.sessionId;
}

function fetchRecording(sessionId: string, headers: Record<string, string> = {}) {
  const req = new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording`, { headers });
  return recordingRoute.GET(req, { params: Promise.resolve({ sessionId }) });
}

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  // A second shop with a supervisor of its own, to show that ids do not cross shops.
  const [other] = await state.t.db.insert(shops).values({ name: "Ferrule Lane Engines" }).returning();
  await state.t.db.insert(users).values({
    shopId: other!.id,
    email: "quill@ferrule.example",
    name: "Quill Armitage",
    role: "supervisor",
    passwordHash: await bcrypt.hash("not-used-here-1", 4),
  });
  ids = await userIds(state.t.db);
  signInAs("rhea@millrace.example");
  recorded = await startSession(await findSeat(state.t.db, "MHW-0141", "4I1"), "phone-rhea-1");
  unrecorded = await startSession(await findSeat(state.t.db, "MHW-0141", "3I1"), "phone-rhea-2");
  const put = await recordingRoute.PUT(
    new NextRequest(`${BASE_URL}/api/sessions/${recorded}/recording`, {
      method: "PUT",
      headers: { "content-type": "audio/wav" },
      body: Buffer.from(wav),
    }),
    { params: Promise.resolve({ sessionId: recorded }) },
  );
  expect(put.status).toBe(201);
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

describe("recording playback", () => {
  it("sends the whole recording with its type and length, and says ranges are accepted", async () => {
    signInAs("rhea@millrace.example");
    const res = await fetchRecording(recorded);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("audio/wav");
    expect(res.headers.get("accept-ranges")).toBe("bytes");
    expect(res.headers.get("content-length")).toBe(String(wav.byteLength));
    expect(new Uint8Array(await res.arrayBuffer())).toEqual(wav);
  });

  it("any reader of the shop may listen, not only the one who recorded it", async () => {
    signInAs("dov@millrace.example");
    expect((await fetchRecording(recorded)).status).toBe(200);
    signInAs("admin@millrace.example");
    expect((await fetchRecording(recorded)).status).toBe(200);
  });

  it("answers bytes=10-99 with 206 and exactly those 90 bytes", async () => {
    signInAs("rhea@millrace.example");
    const res = await fetchRecording(recorded, { range: "bytes=10-99" });
    expect(res.status).toBe(206);
    expect(res.headers.get("content-range")).toBe(`bytes 10-99/${wav.byteLength}`);
    expect(res.headers.get("content-length")).toBe("90");
    expect(res.headers.get("content-type")).toBe("audio/wav");
    expect(new Uint8Array(await res.arrayBuffer())).toEqual(wav.subarray(10, 100));
  });

  it("answers an open range and a suffix range with the right tail", async () => {
    signInAs("rhea@millrace.example");
    const open = await fetchRecording(recorded, { range: `bytes=${wav.byteLength - 5}-` });
    expect(open.status).toBe(206);
    expect(open.headers.get("content-range")).toBe(`bytes ${wav.byteLength - 5}-${wav.byteLength - 1}/${wav.byteLength}`);
    expect(new Uint8Array(await open.arrayBuffer())).toEqual(wav.subarray(wav.byteLength - 5));
    const suffix = await fetchRecording(recorded, { range: "bytes=-16" });
    expect(suffix.status).toBe(206);
    expect(new Uint8Array(await suffix.arrayBuffer())).toEqual(wav.subarray(wav.byteLength - 16));
    // An end past the file is cut to the file, as RFC 9110 §14.1.2 says.
    const past = await fetchRecording(recorded, { range: `bytes=0-${wav.byteLength + 1000}` });
    expect(past.status).toBe(206);
    expect(past.headers.get("content-range")).toBe(`bytes 0-${wav.byteLength - 1}/${wav.byteLength}`);
  });

  it("refuses a range that starts past the end with 416 and the real length", async () => {
    signInAs("rhea@millrace.example");
    const res = await fetchRecording(recorded, { range: `bytes=${wav.byteLength}-${wav.byteLength + 10}` });
    expect(res.status).toBe(416);
    expect(res.headers.get("content-range")).toBe(`bytes */${wav.byteLength}`);
  });

  it("answers 404 with a sentence for a session that was not recorded", async () => {
    signInAs("rhea@millrace.example");
    const res = await fetchRecording(unrecorded);
    expect(res.status).toBe(404);
    expect(await bodyOf(res)).toMatchObject({ error: "not_found", message: "This session was not recorded." });
  });

  it("refuses anonymous callers with 401 and another shop with 404, sending no audio", async () => {
    signInAs(null);
    const anon = await fetchRecording(recorded);
    expect(anon.status).toBe(401);
    expect(anon.headers.get("content-type")).toMatch(/json/);
    signInAs("quill@ferrule.example");
    const stranger = await fetchRecording(recorded);
    expect(stranger.status).toBe(404);
    expect(await bodyOf(stranger)).toMatchObject({ error: "not_found", message: expect.stringMatching(/your shop/) });
  });

  it("refuses an id that is not a UUID with 400", async () => {
    signInAs("rhea@millrace.example");
    expect((await fetchRecording("not-a-session")).status).toBe(400);
  });
});
