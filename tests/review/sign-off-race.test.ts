// Writes racing a sign-off: bursts of every kind of write on a head (clearance, torque set-up and
// ticks, measurements, valve identity, photos, done-checks, session starts, strokes, recordings) while a
// supervisor approves the last seat and signs the head off. Afterwards nothing on the seat is newer
// than its approval and nothing on the head newer than its sign-off, on PGlite and on the
// PostgreSQL server. "Newer" is read from each row's xmin, the transaction that wrote it: a
// transaction gets its id at its first write, so a write that waited for the sign-off's lock and
// went ahead anyway would carry a larger one.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seats } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-race-"));
process.env.GRINDFADE_DATA_DIR = dataDir;

const { freshPglite, freshServerDatabase, serverUrl } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { resetServerEnvCache } = await import("@/lib/env");
const { resetBlobStore } = await import("@/lib/storage");
const sheets = await import("@/lib/heads/sheets");
const bench = await import("@/lib/bench/service");
const review = await import("@/lib/review/service");
const { addSeatPhoto } = await import("@/lib/storage/photos");
const { recordDoneCheck } = await import("@/lib/bench/done-checks");
const { storeRecording } = await import("@/lib/storage/recording-upload");
const { AppError } = await import("@/lib/errors");
const h = await import("../sheets/helpers");
const { seatRow, setJob, strokeInputs } = await import("../bench/helpers");
const { jpegHead, wavFile } = await import("../storage/fixtures");

afterAll(() => fs.rmSync(dataDir, { recursive: true, force: true }));

const backends: Array<[string, () => Promise<TestDatabase>]> = [["PGlite", () => freshPglite()]];
const server = serverUrl();
if (server) backends.push(["the PostgreSQL server", () => freshServerDatabase(server)]);

const streamOf = (bytes: Uint8Array) =>
  new ReadableStream<Uint8Array>({
    start(c) {
      c.enqueue(bytes);
      c.close();
    },
  });
const photo = () => {
  const b = new Uint8Array(2048);
  b.set(jpegHead);
  return streamOf(b);
};

describe.each(backends)("writes racing a sign-off on %s", (_name, open) => {
  let t: TestDatabase;
  beforeAll(async () => {
    resetServerEnvCache();
    resetBlobStore();
    t = await open();
    state.t = t;
    await seedDemoShop(t.db);
  });
  afterAll(async () => {
    await t?.cleanup();
  });

  it("lands every write before the seat's approval and the head's sign-off, or refuses it with 409", async () => {
    const db = t.db;
    const rhea = await h.actorOf(db, "rhea@millrace.example");
    const head = await h.demoHead(db, "MHW-0141");
    const last = head.seatByCode.get("2E2")!;
    const valve = await h.valveIn(db, head, "2E2");
    const deviceId = "race-phone-01";
    // The last seat is lapped to settled on its fine stage, with a recording; every other seat is approved.
    const sessionId = randomUUID();
    await bench.startSession(db, rhea, last, { sessionId, stage: "fine", deviceId });
    await bench.saveStrokes(db, rhea, sessionId, strokeInputs([8, 6, 4, 2, 1, 1, 1, 1]));
    await storeRecording(db, rhea, sessionId, streamOf(wavFile));
    // Five caps of two bolts, centre outwards, 10 N·m in three stages (invented demo figures).
    const torqueSetup = (camshaftId: string) =>
      sheets.setUpTorqueSheet(db, rhea, { camshaftId, capCount: 5, boltsPerCap: 2, order: "centre-out", finalNm: 10, stageFractions: [0.3, 0.6, 1] });
    const sheetId = await torqueSetup(head.camshafts[0]!.id);
    await db.update(seats).set({ state: "approved" }).where(sql`${seats.headId} = ${head.headId} and ${seats.id} <> ${last}`);
    expect((await seatRow(db, last))!.state).toBe("settled");
    await setJob(db, "MHW-0141", { status: "awaiting_audit" });

    const order = (await sheets.getTorqueSheets(db, rhea.shopId, head.jobId)).camshafts[0]!.sheet!.order;
    // Sessions heard before the race whose recordings have not arrived yet: one late first
    // recording per wave.
    const lateSessions: string[] = [];
    for (let n = 0; n < 60; n++) {
      const id = randomUUID();
      await bench.startSession(db, rhea, last, { sessionId: id, stage: "fine", deviceId });
      lateSessions.push(id);
    }
    let late = 0;
    let tick = 0;
    let strokeIndex = 100;
    const writes: Array<() => Promise<unknown>> = [
      () => sheets.recordJournalClearance(db, rhea, h.stripClearance(head.camshafts[0]!.journalIds[0]!, 0.05)),
      () => torqueSetup(head.camshafts[1]!.id),
      () => sheets.tickBolt(db, rhea, { sheetId, stage: 1, boltId: order[tick++ % order.length]! }),
      () => sheets.recordMeasurement(db, rhea, { jobId: head.jobId, kind: "deck_flatness", seatId: null, valueSi: 0.03, enteredUnit: "mm", method: null, spec: null, note: null }),
      () => sheets.recordMeasurement(db, rhea, { jobId: head.jobId, kind: "seat_contact_width", seatId: last, valueSi: 1.4, enteredUnit: "mm", method: null, spec: null, note: null }),
      () => sheets.updateValveIdentity(db, rhea, { valveId: valve.id, tag: `E-${randomUUID().slice(0, 4)}`, partNumber: null, serial: null }),
      () => addSeatPhoto(db, rhea, last, photo()),
      () => recordDoneCheck(db, rhea, { seatId: last, kind: "marking_compound", result: "pass" }),
      () => bench.startSession(db, rhea, last, { sessionId: randomUUID(), stage: "fine", deviceId }),
      () => bench.saveStrokes(db, rhea, sessionId, strokeInputs([1, 1], (strokeIndex += 2))),
      () => storeRecording(db, rhea, sessionId, streamOf(wavFile)),
      () => storeRecording(db, rhea, lateSessions[late++ % lateSessions.length]!, streamOf(wavFile)),
    ];

    const outcomes: PromiseSettledResult<unknown>[] = [];
    let signedOff = false;
    const burst = async () => {
      // Waves of every write, until one wave has run wholly after the sign-off.
      for (let wave = 0; wave < 60; wave++) {
        const after = signedOff;
        outcomes.push(...(await Promise.allSettled(writes.map((w) => w()))));
        if (after) return;
      }
    };
    const signOff = async () => {
      await new Promise((r) => setTimeout(r, 30));
      // Only the marking-compound test is recorded in the race, so the approval gives its reason.
      await review.reviewSeat(db, rhea, { seatId: last, decision: "approved", comment: "Even grey ring.", checksReason: "Leak test done with the head assembled." });
      await review.reviewHead(db, rhea, { jobId: head.jobId, decision: "approved", comment: "Head signed off.", incompleteReason: "Sheets finished at refit." });
      signedOff = true;
    };
    await Promise.all([burst(), burst(), signOff()]);

    // Every write either landed or was refused as a conflict: never another error.
    const refused = outcomes.filter((o): o is PromiseRejectedResult => o.status === "rejected");
    for (const r of refused) {
      expect(r.reason, String(r.reason)).toBeInstanceOf(AppError);
      expect((r.reason as InstanceType<typeof AppError>).status).toBe(409);
    }
    expect(outcomes.length - refused.length).toBeGreaterThan(0);
    expect(refused.length).toBeGreaterThan(0);

    // When each row was written, in commit order (the sign-off's own entries, the customer's link among them, aside). PGlite runs one transaction at a time, so there
    // transaction ids are in commit order; a server runs them side by side, and a writer may take
    // its id before a sign-off that commits first, so there the commit timestamps are compared
    // (track_commit_timestamp, which scripts/test.sh turns on).
    const rows = async (query: ReturnType<typeof sql>) => ((await db.execute(query)) as unknown as { rows: Array<Record<string, string>> }).rows;
    const [{ setting } = { setting: "off" }] = await rows(sql`select setting from pg_settings where name = 'track_commit_timestamp'`);
    if (t.dir === undefined) expect(setting, "start the PostgreSQL server with -c track_commit_timestamp=on (see scripts/test.sh)").toBe("on");
    const landed = t.dir === undefined ? sql.raw("extract(epoch from pg_xact_commit_timestamp(xmin))") : sql.raw("xmin::text::numeric");
    const when = async (query: ReturnType<typeof sql>) => (await rows(query)).map((r) => Number(r.x));
    const [approvedAt] = await when(sql`select ${landed}::text as x from reviews where seat_id = ${last} and decision = 'approved'`);
    const [signedOffAt] = await when(sql`select ${landed}::text as x from reviews where job_id = ${head.jobId} and seat_id is null and decision = 'approved'`);
    expect(approvedAt).toBeLessThan(signedOffAt!);
    const seatRows = await when(sql`
      select ${landed}::text as x from strokes where session_id in (select id from lapping_sessions where seat_id = ${last})
      union all select ${landed}::text from lapping_sessions where seat_id = ${last}
      union all select ${landed}::text from seat_photos where seat_id = ${last}
      union all select ${landed}::text from seat_checks where seat_id = ${last}
      union all select ${landed}::text from measurements where seat_id = ${last}
      union all select ${landed}::text from valves where id = ${valve.id}`);
    const headRows = await when(sql`
      select ${landed}::text as x from measurements where head_id = ${head.headId}
      union all select ${landed}::text from torque_sheets where head_id = ${head.headId}
      union all select ${landed}::text from torque_ticks where sheet_id in (select id from torque_sheets where head_id = ${head.headId})
      union all select ${landed}::text from audit_entries where job_id = ${head.jobId} and action not in ('seat.approved', 'job.signed_off', 'customer_link.created')`);
    expect(seatRows.length).toBeGreaterThan(10);
    expect(seatRows.filter((x) => x >= approvedAt!)).toEqual([]);
    expect(headRows.filter((x) => x >= signedOffAt!)).toEqual([]);
  }, 120_000);
});
