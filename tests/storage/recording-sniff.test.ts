// The recording upload decides the kind from the bytes: a declared audio type does not let a
// photo or text in, and what is stored carries the sniffed type and extension.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { lappingSessions } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, bodyOf, jsonRequest, seatId as findSeat, sessionBody, userIds } from "../bench/helpers";
import { concat, ebmlHeader, heicHead, oggFlacPage, oggOpusPage, pngHead, wavFile } from "./fixtures";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-sniff-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");

let sessionId: string;
const recordings = path.join(dataDir, "blobs", "recordings");
const sessionRow = async () => (await state.t!.db.select().from(lappingSessions).where(eq(lappingSessions.id, sessionId)))[0]!;

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const ids = await userIds(state.t.db);
  state.session = { user: { id: ids.get("ines@millrace.example")! } };
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

function upload(body: Uint8Array, type: string) {
  const req = new NextRequest(`${BASE_URL}/api/sessions/${sessionId}/recording`, {
    method: "PUT",
    headers: { "content-type": type },
    body: Buffer.from(body),
  });
  return recordingRoute.PUT(req, { params: Promise.resolve({ sessionId }) });
}

const listed = () => (fs.existsSync(recordings) ? fs.readdirSync(recordings).sort() : []);

describe("recording upload sniffing", () => {
  it("refuses a PNG, a photo, Ogg FLAC, Matroska or text declared as audio with 415 and stores nothing", async () => {
    for (const [body, type] of [
      [pngHead, "audio/webm"],
      [new TextEncoder().encode("RIFF but not really a wave file"), "audio/wav"],
      [oggFlacPage, "audio/ogg"],
      [ebmlHeader("matroska"), "audio/webm"],
      // An iPhone photo is an ISO base media file too; its brand says it is no sound.
      [heicHead, "audio/mp4"],
    ] as const) {
      const res = await upload(body, type);
      expect(res.status).toBe(415);
      expect(await bodyOf(res)).toMatchObject({ error: "unsupported_media_type", message: expect.stringMatching(/MP4\/M4A \(AAC\), WebM, Ogg, MP3 or WAV/) });
    }
    expect(listed()).toEqual([]);
    expect((await sessionRow()).recordingKey).toBeNull();
  });

  it("stores WebM under its own type whatever was declared, and a later Ogg Opus replaces it", async () => {
    const webm = concat(ebmlHeader(), new Uint8Array(3000).fill(7));
    const res = await upload(webm, "application/octet-stream");
    expect(res.status).toBe(201);
    expect(await sessionRow()).toMatchObject({ recordingKey: expect.stringMatching(new RegExp(`^recordings/${sessionId}-[0-9a-f-]{36}\\.webm$`)), recordingType: "audio/webm", recordingBytes: webm.length });
    expect(new Uint8Array(fs.readFileSync(path.join(dataDir, "blobs", (await sessionRow()).recordingKey!)))).toEqual(webm);

    const ogg = concat(oggOpusPage, new Uint8Array(500).fill(3));
    expect((await upload(ogg, "audio/wav")).status).toBe(201);
    expect(await sessionRow()).toMatchObject({ recordingKey: expect.stringMatching(new RegExp(`^recordings/${sessionId}-[0-9a-f-]{36}\\.ogg$`)), recordingType: "audio/ogg; codecs=opus" });
    // The replaced WebM is not kept alongside.
    expect(listed()).toEqual([(await sessionRow()).recordingKey!.slice("recordings/".length)]);

    expect((await upload(wavFile, "audio/ogg")).status).toBe(201);
    expect(await sessionRow()).toMatchObject({ recordingType: "audio/wav", recordingBytes: wavFile.length });
    expect(listed()).toEqual([(await sessionRow()).recordingKey!.slice("recordings/".length)]);
    expect(listed()).toEqual([expect.stringMatching(/\.wav$/)]);
  });
});
