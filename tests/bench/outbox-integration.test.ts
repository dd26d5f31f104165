// The outbox against the real route handlers and a fresh database, with the network dropping
// out: no stroke lost, none stored twice, refusals kept on the phone and never resent.
import "fake-indexeddb/auto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { judgeSeat, type SeatVerdict } from "@/lib/audio";
import { decayingContrasts } from "@/lib/audio/synth";
import type { OutboxOp } from "@/lib/bench/outbox";
import type { TestDatabase } from "../helpers/db";
import { BASE_URL, counts, quietFor, seatId as findSeat, seatRow, sessionBody, setSeatState, strokeInputs, strokesOfSession, userIds } from "./helpers";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
// Recordings go to a directory of this test's own; storage reads the setting on first use.
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-bench-data-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { Outbox } = await import("@/lib/bench/outbox");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const seatRoute = await import("@/app/api/seats/[seatId]/route");
const strokesRoute = await import("@/app/api/sessions/[sessionId]/strokes/route");
const endRoute = await import("@/app/api/sessions/[sessionId]/end/route");
const recordingRoute = await import("@/app/api/sessions/[sessionId]/recording/route");
const chunksRoute = await import("@/app/api/sessions/[sessionId]/recording/chunks/route");
const { SEAT_HOLD_SECONDS } = await import("@/lib/bench/service");

let ids: Map<string, string>;
const db = () => state.t!.db;

beforeAll(async () => {
  resetServerEnvCache();
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ids = await userIds(state.t.db);
});
afterAll(async () => {
  await state.t?.cleanup();
  fs.rmSync(dataDir, { recursive: true, force: true });
});

type Network = "online" | "offline" | "answer-lost";

/**
 * A phone: its own outbox, signed in as one person, whose requests go straight into the route
 * handlers. "offline" fails before the server hears anything; "answer-lost" lets the server do
 * the work and then drops its answer, the case a resend must be harmless for.
 */
function phone(email: string) {
  const p = {
    network: "online" as Network,
    signedIn: true,
    answers: [] as Array<{ url: string; status: number; body: unknown }>,
    box: null as unknown as InstanceType<typeof Outbox>,
  };
  const fetchFn = async (url: string, init?: RequestInit): Promise<Response> => {
    if (p.network === "offline") throw new TypeError("fetch failed");
    state.session = p.signedIn ? { user: { id: ids.get(email)! } } : null;
    const req = new NextRequest(`${BASE_URL}${url}`, init as ConstructorParameters<typeof NextRequest>[1]);
    const res = await route(req, url);
    const body = res.headers.get("content-type")?.includes("json") ? ((await res.clone().json()) as unknown) : null;
    p.answers.push({ url, status: res.status, body });
    if (p.network === "answer-lost") throw new TypeError("network connection was lost");
    return res;
  };
  p.box = new Outbox(`bench-phone-${randomUUID()}`, fetchFn);
  return p;
}

async function route(req: NextRequest, url: string): Promise<Response> {
  const [, , kind, id, action, sub] = url.split("/");
  if (kind === "seats" && action === "sessions") return sessionsRoute.POST(req, { params: Promise.resolve({ seatId: id! }) });
  const params = { params: Promise.resolve({ sessionId: id! }) };
  if (action === "strokes") return strokesRoute.POST(req, params);
  if (action === "end") return endRoute.POST(req, params);
  if (action === "recording" && sub === "chunks") {
    const method = req.method;
    return method === "PUT" ? chunksRoute.PUT(req, params) : method === "HEAD" ? chunksRoute.HEAD(req, params) : chunksRoute.GET(req, params);
  }
  if (action === "recording") return recordingRoute.PUT(req, params);
  throw new Error(`no route for ${url}`);
}

/** A tiny WAV file: RIFF header and a few silent 16-bit samples. */
function smallWav(): Blob {
  const samples = 32;
  const buf = Buffer.alloc(44 + samples * 2);
  buf.write("RIFF", 0);
  buf.writeUInt32LE(36 + samples * 2, 4);
  buf.write("WAVEfmt ", 8);
  buf.writeUInt32LE(16, 16);
  buf.writeUInt16LE(1, 20);
  buf.writeUInt16LE(1, 22);
  buf.writeUInt32LE(8000, 24);
  buf.writeUInt32LE(16000, 28);
  buf.writeUInt16LE(2, 32);
  buf.writeUInt16LE(16, 34);
  buf.write("data", 36);
  buf.writeUInt32LE(samples * 2, 40);
  return new Blob([buf], { type: "audio/wav" });
}

describe("outbox and server together", () => {
  it("a session lapped through a dropping network ends up on the server whole, each stroke once", async () => {
    const seat = await findSeat(db(), "MHW-0141", "4E1");
    const ines = phone("ines@millrace.example");
    const session = sessionBody("coarse", "phone-ines-1");
    // 10 dB fading toward 0.4 dB by e every 4 strokes: settles within the session (common practice for a seat cutting in).
    const strokes = strokeInputs(decayingContrasts(24, 10, 0.4, 4));
    const stroke = (k: number): OutboxOp => ({ kind: "stroke", seatId: seat, sessionId: session.sessionId, stroke: strokes[k]! });

    await ines.box.add({ kind: "session", seatId: seat, body: session });
    expect((await ines.box.flush()).stoppedBy).toBe("done");
    for (let k = 0; k < 6; k++) {
      await ines.box.add(stroke(k));
      expect((await ines.box.flush()).stoppedBy).toBe("done");
    }
    ines.network = "offline";
    for (let k = 6; k < 14; k++) {
      await ines.box.add(stroke(k));
      expect((await ines.box.flush()).stoppedBy).toBe("offline");
    }
    expect(await strokesOfSession(db(), session.sessionId)).toHaveLength(6);
    expect(await ines.box.count()).toBe(8);

    // The server saves strokes 7–15 but the phone never hears so.
    ines.network = "answer-lost";
    await ines.box.add(stroke(14));
    expect((await ines.box.flush()).stoppedBy).toBe("offline");
    expect(await strokesOfSession(db(), session.sessionId)).toHaveLength(15);
    expect(await ines.box.count()).toBe(9);

    ines.network = "online";
    for (let k = 15; k < 24; k++) await ines.box.add(stroke(k));
    await ines.box.add({ kind: "recording", seatId: seat, sessionId: session.sessionId, type: "audio/wav", blob: smallWav() });
    await ines.box.add({ kind: "end", seatId: seat, sessionId: session.sessionId });
    const done = await ines.box.flush();
    expect(done).toMatchObject({ stoppedBy: "done", pending: 0, refused: [], sent: 20 });
    expect(await ines.box.count()).toBe(0);
    const resend = ines.answers.find((a) => a.url.endsWith("/strokes") && (a.body as { duplicates: number }).duplicates > 0);
    expect(resend?.body).toMatchObject({ accepted: 9, duplicates: 9 });

    const stored = await strokesOfSession(db(), session.sessionId);
    expect(stored).toHaveLength(strokes.length);
    expect(new Set(stored.map((s) => s.clientId)).size).toBe(strokes.length);
    expect(stored.map((s) => s.clientId).sort()).toEqual(strokes.map((s) => s.clientId).sort());

    // The server's verdict, over everything it has, is judgeSeat's over what the phone heard.
    state.session = { user: { id: ids.get("ines@millrace.example")! } };
    const res = await seatRoute.GET(new NextRequest(`${BASE_URL}/api/seats/${seat}`), { params: Promise.resolve({ seatId: seat }) });
    const report = (await res.json()) as { stages: { coarse: { verdict: SeatVerdict; sessions: Array<{ endedAt: string | null; hasRecording: boolean }> } } };
    const reference = judgeSeat(strokes.map((s, i) => ({ contrastDb: s.contrastDb, index: i + 1, startS: s.startS })));
    expect(reference.state).toBe("settled");
    expect(report.stages.coarse.verdict.state).toBe(reference.state);
    expect(report.stages.coarse.verdict.settled?.atStroke).toBe(reference.settled?.atStroke);
    expect(report.stages.coarse.sessions).toEqual([expect.objectContaining({ endedAt: expect.any(String), hasRecording: true })]);
    // Each upload is kept under a key of its own: the session's one file.
    const kept = fs.readdirSync(path.join(dataDir, "blobs", "recordings")).filter((f) => f.startsWith(session.sessionId));
    expect(kept).toEqual([expect.stringMatching(/\.wav$/)]);
    const file = path.join(dataDir, "blobs", "recordings", kept[0]!);
    expect(fs.readFileSync(file)).toEqual(Buffer.from(await smallWav().arrayBuffer()));
  });

  it("a second phone on a busy seat is refused, and nothing it heard is stored or resent", async () => {
    const seat = await findSeat(db(), "MHW-0141", "4E2");
    const ines = phone("ines@millrace.example");
    const first = sessionBody("coarse", "phone-ines-1");
    await ines.box.add({ kind: "session", seatId: seat, body: first });
    await ines.box.flush();

    const rhea = phone("rhea@millrace.example");
    const second = sessionBody("coarse", "phone-rhea-2");
    await rhea.box.add({ kind: "session", seatId: seat, body: second });
    for (const s of strokeInputs([7, 6, 5])) await rhea.box.add({ kind: "stroke", seatId: seat, sessionId: second.sessionId, stroke: s });
    const before = await counts(db());
    const report = await rhea.box.flush();
    expect(report.refused.map((r) => r.message)).toEqual([expect.stringMatching(/busy/)]);
    expect(rhea.answers.map((a) => a.status)).toEqual([409]);

    // More strokes after the refusal, and a later flush once the first phone has gone quiet.
    await rhea.box.add({ kind: "stroke", seatId: seat, sessionId: second.sessionId, stroke: strokeInputs([4], 4)[0]! });
    await quietFor(db(), first.sessionId, SEAT_HOLD_SECONDS + 5);
    await rhea.box.flush();
    expect(rhea.answers).toHaveLength(1);
    expect(await counts(db())).toEqual(before);
    expect((await rhea.box.all()).every((op) => op.failed)).toBe(true);
    expect(await rhea.box.count()).toBe(5);
  });

  it("strokes queued while signed out wait for sign-in; strokes for a seat signed off meanwhile are refused", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3E2");
    const ines = phone("ines@millrace.example");
    const session = sessionBody("fine", "phone-ines-1");
    await ines.box.add({ kind: "session", seatId: seat, body: session });
    await ines.box.flush();

    ines.signedIn = false;
    for (const s of strokeInputs([3, 2.5])) await ines.box.add({ kind: "stroke", seatId: seat, sessionId: session.sessionId, stroke: s });
    expect(await ines.box.flush()).toMatchObject({ stoppedBy: "signed-out", pending: 2 });
    ines.signedIn = true;
    expect(await ines.box.flush()).toMatchObject({ stoppedBy: "done", sent: 2 });
    expect(await strokesOfSession(db(), session.sessionId)).toHaveLength(2);

    ines.network = "offline";
    for (const s of strokeInputs([2, 1.8], 3)) await ines.box.add({ kind: "stroke", seatId: seat, sessionId: session.sessionId, stroke: s });
    await ines.box.flush();
    await setSeatState(db(), seat, "approved");
    ines.network = "online";
    const report = await ines.box.flush();
    expect(report.refused).toEqual([expect.objectContaining({ message: expect.stringMatching(/signed off/) })]);
    expect(await strokesOfSession(db(), session.sessionId)).toHaveLength(2);
    expect((await seatRow(db(), seat)).state).toBe("approved");
    await ines.box.flush();
    expect(ines.answers.filter((a) => a.status === 409)).toHaveLength(1);
  });
});
