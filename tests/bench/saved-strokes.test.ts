// The bench screen keeps its copy of the seat up to date from the answers to its own stroke saves
// (lib/bench/saved-strokes.ts) instead of reading the seat after every stroke. Held here to the
// real thing: after every save, the copy built from the answers must equal the seat as the server
// reads it afresh — strokes, numbering, verdict and seat state — through coarse to settled and on
// into fine, with resends and flagged strokes among them.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { users } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import type { Actor } from "@/lib/auth/authorize";
import { getSeatReport, saveStrokes, startSession, type SeatReport } from "@/lib/bench/service";
import { applySavedStrokes } from "@/lib/bench/saved-strokes";
import type { SavedStrokes } from "@/lib/bench/outbox";
import { freshPglite, type TestDatabase } from "../helpers/db";
import { seatId as findSeat, sessionBody, strokeInputs } from "./helpers";

let t: TestDatabase;
let ines: Actor;
let seat: string;

beforeAll(async () => {
  t = await freshPglite();
  await seedDemoShop(t.db);
  const [row] = await t.db.select().from(users).where(eq(users.email, "ines@millrace.example"));
  ines = { id: row!.id, shopId: row!.shopId, name: row!.name, email: row!.email, role: row!.role };
  // A seat of MHW-0141 no other test here touches, waiting for its first stroke.
  seat = await findSeat(t.db, "MHW-0141", "4E1");
});
afterAll(async () => t?.cleanup());

/** What the screen compares: everything the curve, the counter and the state line show. */
const shown = (r: SeatReport) => ({
  state: r.seat.state,
  coarse: { strokes: r.stages.coarse.strokes, verdict: r.stages.coarse.verdict },
  fine: { strokes: r.stages.fine.strokes, verdict: r.stages.fine.verdict },
});

describe("a seat kept up to date from stroke-save answers", () => {
  it("equals a fresh read of the seat after every save, through coarse and fine", async () => {
    let copy = await getSeatReport(t.db, ines, seat);
    const coarse = sessionBody("coarse", "saved-strokes-phone");
    await startSession(t.db, ines, seat, coarse);
    // A session start is not a stroke save: the screen reads the seat after it.
    copy = await getSeatReport(t.db, ines, seat);
    // Coarse: a fade with a flagged stroke in it, sent one, two and three at a time, one resent.
    const contrasts = [11, 9.5, 8.2, 6.9, 5.1, 4.4, 3.0, 2.2, 1.5, 1.1, 0.8, 0.7, 0.6, 0.6, 0.5, 0.5, 0.5];
    const all = strokeInputs(contrasts);
    all[4] = { ...all[4]!, flags: ["impulsive"] };
    const chunks = [[0], [1, 2], [3, 4, 5], [5, 6], [7], [8, 9, 10], [11], [12, 13], [14, 15, 16]];
    let applied = 0;
    for (const chunk of chunks) {
      const sent = chunk.map((k) => all[k]!);
      const answer = await saveStrokes(t.db, ines, coarse.sessionId, sent);
      const saved: SavedStrokes[] = [{ seatId: seat, sessionId: coarse.sessionId, strokes: sent, answer: JSON.parse(JSON.stringify(answer)) }];
      const next = applySavedStrokes(copy, saved);
      expect(next).not.toBeNull();
      copy = next!;
      applied++;
      expect(shown(copy)).toEqual(shown(await getSeatReport(t.db, ines, seat)));
    }
    expect(applied).toBe(chunks.length);
    expect(copy.stages.coarse.verdict.state).toBe("settled");

    // Fine, in a session of its own: two saves answered together in one flush.
    const fine = sessionBody("fine", "saved-strokes-phone");
    await startSession(t.db, ines, seat, fine);
    copy = await getSeatReport(t.db, ines, seat);
    const fineStrokes = strokeInputs([4.5, 2.5, 1.2, 0.7, 0.5, 0.5, 0.4, 0.4, 0.4, 0.4]);
    const first = fineStrokes.slice(0, 6);
    const second = fineStrokes.slice(6);
    const a1 = await saveStrokes(t.db, ines, fine.sessionId, first);
    const a2 = await saveStrokes(t.db, ines, fine.sessionId, second);
    copy = applySavedStrokes(copy, [
      { seatId: seat, sessionId: fine.sessionId, strokes: first, answer: a1 },
      { seatId: seat, sessionId: fine.sessionId, strokes: second, answer: a2 },
    ])!;
    expect(shown(copy)).toEqual(shown(await getSeatReport(t.db, ines, seat)));
    expect(copy.seat.state).toBe("settled");
  });

  it("asks for a read when the answers do not add up", async () => {
    const copy = await getSeatReport(t.db, ines, seat);
    const sessionId = copy.stages.coarse.sessions[0]!.id;
    const stroke = strokeInputs([0.4], 90);
    const answer = { accepted: 1, duplicates: 0, seatState: "settled", verdict: copy.stages.coarse.verdict, strokeCount: copy.stages.coarse.strokes.length + 1 };
    // A session the copy does not know (started on another phone).
    expect(applySavedStrokes(copy, [{ seatId: seat, sessionId: "00000000-0000-4000-8000-000000000000", strokes: stroke, answer }])).toBeNull();
    // An answer of another shape.
    expect(applySavedStrokes(copy, [{ seatId: seat, sessionId, strokes: stroke, answer: { ok: true } }])).toBeNull();
    // The server counts a stroke more than the copy holds (one saved from elsewhere).
    expect(applySavedStrokes(copy, [{ seatId: seat, sessionId, strokes: stroke, answer: { ...answer, strokeCount: answer.strokeCount + 1 } }])).toBeNull();
    // Saves of another seat leave nothing to apply.
    expect(applySavedStrokes(copy, [{ seatId: "another-seat", sessionId, strokes: stroke, answer }])).toBeNull();
    // And the copy it was given is untouched.
    expect(shown(copy)).toEqual(shown(await getSeatReport(t.db, ines, seat)));
  });
});
