// Valve-to-seat rule on a demo head: lapped valves stay in their seats, unlapped ones swap with an audit entry, kinds never mix, and a saved stroke laps the seat's valve.
import { and, desc, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { auditEntries, valves } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const { saveValveMove } = await import("@/lib/actions/sheets");
const { initialActionState } = await import("@/lib/actions/state");
const { moveValve } = await import("@/lib/heads/sheets");
const { startSession, saveStrokes } = await import("@/lib/bench/service");
const { ConflictError } = await import("@/lib/errors");
const h = await import("./helpers");

let head: Awaited<ReturnType<typeof h.demoHead>>;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  head = await h.demoHead(state.t.db, "MHW-0141");
  state.session = { user: { id: await h.userId(state.t.db, "ines@millrace.example") } };
});
afterAll(async () => {
  await state.t?.cleanup();
});

const db = () => state.t!.db;
const move = (valveId: string, toSeatId: string) =>
  saveValveMove(initialActionState, h.form({ jobId: head.jobId, valveId, toSeatId }));

describe("valve-to-seat rule (service manuals: a valve goes back into the seat it was lapped in)", () => {
  it("refuses to move a lapped valve of cylinder 1 to another seat, naming its seat, and changes nothing", async () => {
    // Demo data (db/seed.ts): cylinder 1 of MHW-0141 is settled, so its valves are lapped in.
    const valve = await h.valveIn(db(), head, "1I1");
    expect(valve.lappedInSeatId).toBe(head.seatByCode.get("1I1"));
    const before = await h.snapshot(db());
    const res = await move(valve.id, head.seatByCode.get("3I1")!);
    expect(res.ok).toBe(false);
    expect(res.message).toContain("lapped into seat 1I1");
    expect(await h.snapshot(db())).toEqual(before);

    const ines = await h.actorOf(db(), "ines@millrace.example");
    await expect(moveValve(db(), ines, { valveId: valve.id, toSeatId: head.seatByCode.get("3I1")! })).rejects.toBeInstanceOf(ConflictError);
  });

  it("swaps two unlapped valves (3I1 and 3I2): each seat holds the other valve and valve.swapped records before and after", async () => {
    const a = await h.valveIn(db(), head, "3I1");
    const b = await h.valveIn(db(), head, "3I2");
    expect(a.lappedInSeatId).toBeNull();
    expect(b.lappedInSeatId).toBeNull();
    const res = await move(a.id, head.seatByCode.get("3I2")!);
    expect(res).toMatchObject({ ok: true });
    expect((await h.valveIn(db(), head, "3I1")).id).toBe(b.id);
    expect((await h.valveIn(db(), head, "3I2")).id).toBe(a.id);
    const [entry] = await db()
      .select()
      .from(auditEntries)
      .where(and(eq(auditEntries.action, "valve.swapped"), eq(auditEntries.entityId, a.id)))
      .orderBy(desc(auditEntries.id));
    expect(entry).toBeDefined();
    expect(entry!.jobId).toBe(head.jobId);
    expect(entry!.before).toEqual({ valve: a.tag, seat: "3I1" });
    expect(entry!.after).toEqual({ valve: a.tag, seat: "3I2", swappedWith: b.tag });
  });

  it("refuses to move an unlapped valve into a seat whose valve is lapped into it", async () => {
    const loose = await h.valveIn(db(), head, "4I1");
    expect(loose.lappedInSeatId).toBeNull();
    const before = await h.snapshot(db());
    const res = await move(loose.id, head.seatByCode.get("1I2")!);
    expect(res.ok).toBe(false);
    expect(res.message).toMatch(/Seat 1I2 already holds valve 1I2, lapped into it/);
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("refuses to move an intake valve into an exhaust seat, with a field message", async () => {
    const intake = await h.valveIn(db(), head, "4I2");
    const before = await h.snapshot(db());
    const res = await move(intake.id, head.seatByCode.get("4E1")!);
    expect(res.ok).toBe(false);
    expect(res.message).toContain("intake valve");
    expect(res.message).toContain("4E1 is exhaust");
    expect(res.fieldErrors).toMatchObject({ toSeatId: ["Choose a seat of the same kind."] });
    expect(await h.snapshot(db())).toEqual(before);
  });

  it("a stroke saved through the bench service laps the seat's valve, which then cannot move", async () => {
    const ines = await h.actorOf(db(), "ines@millrace.example");
    const seatId = head.seatByCode.get("4E2")!;
    const valve = await h.valveIn(db(), head, "4E2");
    expect(valve.lappedInSeatId).toBeNull();
    const sessionId = crypto.randomUUID();
    await startSession(db(), ines, seatId, { sessionId, stage: "coarse", deviceId: "test-phone-0001" });
    const saved = await saveStrokes(db(), ines, sessionId, [
      { clientId: crypto.randomUUID(), index: 1, startS: 1, endS: 1.8, onsetDb: -22, bodyDb: -33, contrastDb: 11, flags: [] },
    ]);
    expect(saved.accepted).toBe(1);
    const [after] = await db().select().from(valves).where(eq(valves.id, valve.id));
    expect(after!.lappedInSeatId).toBe(seatId);

    const before = await h.snapshot(db());
    const res = await move(valve.id, head.seatByCode.get("4E1")!);
    expect(res.ok).toBe(false);
    expect(res.message).toContain("lapped into seat 4E2");
    expect(await h.snapshot(db())).toEqual(before);
  });
});
