// Every phone's recording through the resumable upload and back out of listen-back's route:
// real files made at test time by Debian's ffmpeg (tests/storage/encoded.ts) — Safari's
// fragmented MP4/AAC, a recorder app's M4A, WebM/Opus, Ogg/Opus, MP3 — are stored under the
// type their bytes say, and served with that Content-Type and with byte ranges.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { lappingSessions } from "@/db/schema";
import { decayingContrasts, synthesizeSession } from "@/lib/audio/synth";
import { encodeWav } from "@/lib/audio/wav";
import { skipWithout } from "../audio/helpers";
import { BASE_URL, jsonRequest, seatId as findSeat, sessionBody, userIds } from "../bench/helpers";
import { mockAppContext } from "../helpers/app-mocks";
import { encodeWith, type EncodedKind } from "./encoded";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-formats-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const chunksRoute = await import("@/app/api/sessions/[sessionId]/recording/chunks/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");

let seat: string;
const wavPath = path.join(dataDir, "lapping.wav");

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const ids = await userIds(state.t.db);
  state.session = { user: { id: ids.get("ines@millrace.example")! } };
  seat = await findSeat(state.t.db, "MHW-0141", "4I1");
  const sound = synthesizeSession({ sampleRate: 48000, seed: 5, leadInS: 2, tailS: 0.5, strokes: decayingContrasts(6, 10, 1, 2).map((c) => ({ contrastDb: c })) });
  fs.writeFileSync(wavPath, encodeWav([sound.samples], 48000, { bitsPerSample: 16 }));
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

async function newSession(): Promise<string> {
  const body = sessionBody("coarse", "phone-ines-formats");
  const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
  expect(res.status).toBe(201);
  return body.sessionId;
}

/** Sends `bytes` in chunks of `size` as the phone's uploader does; returns the last answer. */
async function sendInChunks(sessionId: string, bytes: Uint8Array, size: number): Promise<Response> {
  let last: Response | null = null;
  for (let start = 0; start < bytes.length; start += size) {
    const end = Math.min(start + size, bytes.length) - 1;
    const req = new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording/chunks`, {
      method: "PUT",
      headers: { "content-range": `bytes ${start}-${end}/${bytes.length}`, "content-type": "application/octet-stream", "content-length": String(end - start + 1) },
      body: Buffer.from(bytes.subarray(start, end + 1)),
    });
    last = await chunksRoute.PUT(req, { params: Promise.resolve({ sessionId }) });
    expect(last.status, await last.clone().text()).toBe(end + 1 === bytes.length ? 201 : 200);
  }
  return last!;
}

const get = (sessionId: string, range?: string) =>
  recordingRoute.GET(new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording`, { headers: range ? { range } : {} }), {
    params: Promise.resolve({ sessionId }),
  });

describe.skipIf(skipWithout("ffmpeg"))("recordings of every phone, made by ffmpeg (Debian)", () => {
  it.each([
    ["webkit-mp4", "audio/mp4", "m4a"],
    ["m4a", "audio/mp4", "m4a"],
    ["webm-opus", "audio/webm", "webm"],
    ["ogg-opus", "audio/ogg; codecs=opus", "ogg"],
    ["ogg-vorbis", "audio/ogg", "ogg"],
    ["mp3", "audio/mpeg", "mp3"],
  ] as const)("%s goes up in chunks, is stored as %s and served whole and by ranges", async (kind: EncodedKind, type, ext) => {
    const bytes = new Uint8Array(fs.readFileSync(encodeWith(kind, wavPath, dataDir)));
    expect(bytes.length).toBeGreaterThan(20_000);
    const sessionId = await newSession();
    await sendInChunks(sessionId, bytes, 8192);
    const [row] = await state.t!.db.select().from(lappingSessions).where(eq(lappingSessions.id, sessionId));
    expect(row).toMatchObject({ recordingType: type, recordingBytes: bytes.length, recordingKey: expect.stringMatching(new RegExp(`\\.${ext}$`)) });

    const whole = await get(sessionId);
    expect(whole.status).toBe(200);
    expect(whole.headers.get("content-type")).toBe(type);
    expect(whole.headers.get("accept-ranges")).toBe("bytes");
    expect(new Uint8Array(await whole.arrayBuffer())).toEqual(bytes);

    // What an audio element asks first, then a seek into the middle, then the last bytes.
    const open = await get(sessionId, "bytes=0-");
    expect(open.status).toBe(206);
    expect(open.headers.get("content-type")).toBe(type);
    expect(open.headers.get("content-range")).toBe(`bytes 0-${bytes.length - 1}/${bytes.length}`);
    const mid = await get(sessionId, "bytes=1000-4999");
    expect(mid.status).toBe(206);
    expect(mid.headers.get("content-length")).toBe("4000");
    expect(new Uint8Array(await mid.arrayBuffer())).toEqual(bytes.subarray(1000, 5000));
    const tail = await get(sessionId, "bytes=-100");
    expect(new Uint8Array(await tail.arrayBuffer())).toEqual(bytes.subarray(bytes.length - 100));
    expect((await get(sessionId, `bytes=${bytes.length}-`)).status).toBe(416);
  });
});
