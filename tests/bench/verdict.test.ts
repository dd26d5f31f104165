// The server's verdict: recomputed from the stored strokes with lib/audio's judgeSeat, checked
// against the settled rule worked out by hand, and the seat states it leads to.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { judgeSeat, type SeatVerdict } from "@/lib/audio";
import { decayingContrasts } from "@/lib/audio/synth";
import type { StrokeInput } from "@/lib/validations/bench";
import type { TestDatabase } from "../helpers/db";
import {
  auditFor,
  bodyOf,
  jsonRequest,
  seatId as findSeat,
  seatRow,
  sessionBody,
  settledAtByHand,
  slopeByHand,
  strokeInputs,
  userIds,
} from "./helpers";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();

const { freshPglite } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const sessionsRoute = await import("@/app/api/seats/[seatId]/sessions/route");
const seatRoute = await import("@/app/api/seats/[seatId]/route");
const strokesRoute = await import("@/app/api/sessions/[sessionId]/strokes/route");
const endRoute = await import("@/app/api/sessions/[sessionId]/end/route");
const { seatStateFor } = await import("@/lib/bench/service");

const db = () => state.t!.db;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  const ids = await userIds(state.t.db);
  state.session = { user: { id: ids.get("ines@millrace.example")! } };
});
afterAll(async () => {
  await state.t?.cleanup();
});

interface SaveBody {
  accepted: number;
  duplicates: number;
  seatState: string;
  verdict: SeatVerdict;
  strokeCount: number;
}

async function open(seat: string, stage: "coarse" | "fine"): Promise<string> {
  const body = sessionBody(stage, "phone-ines-1");
  const res = await sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
  expect(res.status).toBe(201);
  return body.sessionId;
}
async function send(sessionId: string, strokes: StrokeInput[]): Promise<SaveBody> {
  const res = await strokesRoute.POST(jsonRequest(`/api/sessions/${sessionId}/strokes`, { strokes }), {
    params: Promise.resolve({ sessionId }),
  });
  expect(res.status).toBe(201);
  return (await res.json()) as SaveBody;
}
async function end(sessionId: string): Promise<void> {
  await endRoute.POST(jsonRequest(`/api/sessions/${sessionId}/end`), { params: Promise.resolve({ sessionId }) });
}

/** judgeSeat on the strokes as sent, numbered in lapping order: the reference verdict. */
function reference(list: readonly StrokeInput[]): SeatVerdict {
  return judgeSeat(list.map((s, i) => ({ contrastDb: s.contrastDb, index: i + 1, startS: s.startS, flags: s.flags })));
}

/**
 * The server's verdict equals the reference in every decision; the fitted numbers agree to
 * single precision, since strokes are stored as PostgreSQL reals.
 */
function expectSameVerdict(server: SeatVerdict, ref: SeatVerdict): void {
  const { fit, settled, ...decisions } = server;
  const { fit: refFit, settled: refSettled, ...refDecisions } = ref;
  expect(decisions).toEqual(refDecisions);
  expect(settled?.atStroke).toBe(refSettled?.atStroke);
  if (refSettled?.atS != null) expect(settled!.atS!).toBeCloseTo(refSettled.atS, 4);
  expect(fit === null).toBe(refFit === null);
  if (fit && refFit) {
    expect(fit.strokes).toBe(refFit.strokes);
    for (const k of ["amplitudeDb", "decayStrokes", "floorDb"] as const) expect(fit[k]).toBeCloseTo(refFit[k], 4);
  }
}

describe("seatStateFor", () => {
  // Only the state of a verdict decides the seat; the rest is filler.
  const v = (state: SeatVerdict["state"]): SeatVerdict => ({
    state,
    judgedStrokes: 0,
    leftOutStrokes: 0,
    leftOutByFlag: {},
    fit: null,
    strokesRemaining: null,
    forecastStable: false,
    settled: null,
    notSettling: state === "not-settling",
    rule: { consecutive: 4, maxContrastDb: 1.5, maxSlopeDbPerStroke: 0.3 },
  });

  it("a settled fine stage settles the seat; a settled coarse stage keeps it lapping", () => {
    expect(seatStateFor("lapping", "fine", v("settled"), v("settled"))).toBe("settled");
    expect(seatStateFor("lapping", "coarse", v("settled"), v("no-strokes"))).toBe("lapping");
    expect(seatStateFor("lapping", "coarse", v("fading"), v("settled"))).toBe("settled");
  });

  it("a stage that is not settling stalls the seat, and fading again takes it back to lapping", () => {
    expect(seatStateFor("lapping", "coarse", v("not-settling"), v("no-strokes"))).toBe("stalled");
    expect(seatStateFor("stalled", "coarse", v("fading"), v("no-strokes"))).toBe("lapping");
  });

  it("a signed-off seat stays signed off whatever the strokes say", () => {
    expect(seatStateFor("approved", "fine", v("not-settling"), v("not-settling"))).toBe("approved");
  });

  it("a waiting seat with no coarse strokes keeps waiting", () => {
    expect(seatStateFor("waiting", "coarse", v("no-strokes"), v("no-strokes"))).toBe("waiting");
    expect(seatStateFor("waiting", "fine", v("no-strokes"), v("no-strokes"))).toBe("lapping");
  });
});

describe("the server's verdict", () => {
  it("coarse then fine: judged from the stored strokes, equal to judgeSeat and to the rule by hand", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3I1");
    // 12 dB fading toward 0.3 dB by e every 4 strokes: a curve that settles (common practice for a seat cutting in).
    const contrasts = decayingContrasts(20, 12, 0.3, 4);
    const expectedAt = settledAtByHand(contrasts)!;
    // The rule first holds within the second session's strokes, so how sessions are ordered matters.
    expect(expectedAt).toBeGreaterThan(10);

    // Two sessions of the coarse stage, the second with its own clock starting again near 0 s.
    const first = await open(seat, "coarse");
    const a = strokeInputs(contrasts.slice(0, 10));
    const afterA = await send(first, a);
    expectSameVerdict(afterA.verdict, reference(a));
    expect(afterA.verdict.state).toBe("fading");
    expect(afterA.seatState).toBe("lapping");
    await end(first);

    const second = await open(seat, "coarse");
    const b = strokeInputs(contrasts.slice(10));
    // Sent last-first: the server orders by when the strokes were lapped, not by arrival.
    await send(second, b.slice(5));
    const afterB = await send(second, b.slice(0, 5));
    const all = [...a, ...b];
    expect(afterB.strokeCount).toBe(20);
    expectSameVerdict(afterB.verdict, reference(all));
    expect(afterB.verdict.state).toBe("settled");
    expect(afterB.verdict.settled?.atStroke).toBe(expectedAt);
    // Ordering the two sessions' strokes by their own clocks alone would judge another curve.
    const byClockOnly = [...all].sort((x, y) => x.startS - y.startS || x.index - y.index);
    expect(reference(byClockOnly).settled?.atStroke).not.toBe(expectedAt);
    // A settled coarse stage is not a settled seat.
    expect(afterB.seatState).toBe("lapping");
    expect((await seatRow(db(), seat)).state).toBe("lapping");

    // The window that settled it, by hand.
    const window = contrasts.slice(expectedAt - 4, expectedAt);
    expect(window.every((c) => c <= 1.5)).toBe(true);
    expect(Math.abs(slopeByHand(window))).toBeLessThanOrEqual(0.3);

    // Fine stage: 5 dB toward 0.2 dB by e every 3 strokes.
    const fine = decayingContrasts(16, 5, 0.2, 3);
    const fineAt = settledAtByHand(fine)!;
    expect(fineAt).toBeGreaterThan(4);
    const fs = await open(seat, "fine");
    const early = strokeInputs(fine.slice(0, fineAt - 1));
    const notYet = await send(fs, early);
    expect(notYet.verdict.state).toBe("fading");
    expect(notYet.seatState).toBe("lapping");
    const late = strokeInputs(fine.slice(fineAt - 1), fineAt);
    const done = await send(fs, late);
    expectSameVerdict(done.verdict, reference([...early, ...late]));
    expect(done.verdict.settled?.atStroke).toBe(fineAt);
    expect(done.seatState).toBe("settled");
    expect((await seatRow(db(), seat)).state).toBe("settled");
    const changes = await auditFor(db(), seat, "seat.state_changed");
    expect(changes.map((c) => (c.after as { state: string }).state)).toContain("settled");

    // The seat report serves the same verdicts and the strokes in lapping order.
    const res = await seatRoute.GET(jsonRequest(`/api/seats/${seat}`, undefined, "GET"), { params: Promise.resolve({ seatId: seat }) });
    const report = (await bodyOf(res)) as unknown as {
      stages: Record<"coarse" | "fine", { verdict: SeatVerdict; strokes: Array<{ n: number; clientId: string }> }>;
      seat: { state: string };
    };
    expect(report.seat.state).toBe("settled");
    expect(report.stages.coarse.verdict).toEqual(afterB.verdict);
    expect(report.stages.coarse.strokes.map((s) => s.clientId)).toEqual(all.map((s) => s.clientId));
    expect(report.stages.fine.verdict).toEqual(done.verdict);
  });

  it("a run of flat-high strokes stalls the seat at the 12th stroke, and fading again resumes lapping", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3I2");
    // 8 dB flattening at 4 dB: well above the 1.5 dB settled limit (Grindfade's documented rule).
    const flat = decayingContrasts(12, 8, 4, 2);
    const session = await open(seat, "coarse");
    const first11 = strokeInputs(flat.slice(0, 11));
    const at11 = await send(session, first11);
    // Not settling is only judged from 12 strokes on (lib/audio/README.md, "Not settling").
    expect(at11.verdict.state).toBe("fading");
    expect(at11.seatState).toBe("lapping");
    const twelfth = strokeInputs(flat.slice(11), 12);
    const at12 = await send(session, twelfth);
    expectSameVerdict(at12.verdict, reference([...first11, ...twelfth]));
    expect(at12.verdict.state).toBe("not-settling");
    expect(settledAtByHand(flat)).toBeNull();
    expect(Math.abs(slopeByHand(flat.slice(-6)))).toBeLessThanOrEqual(0.3);
    expect(at12.verdict.fit!.floorDb).toBeGreaterThan(1.5);
    expect(at12.seatState).toBe("stalled");
    expect((await seatRow(db(), seat)).state).toBe("stalled");

    // Fresh compound: the contrast falls again and the seat is no longer stalled.
    const falling = [3, 2.2, 1.4, 1.1, 1.0, 0.95, 0.9];
    const after = await send(session, strokeInputs(falling, 13));
    const coarseAt = settledAtByHand([...flat, ...falling]);
    expect(coarseAt).not.toBeNull();
    expect(after.verdict.state).toBe("settled");
    expect(after.verdict.settled?.atStroke).toBe(coarseAt);
    expect(after.seatState).toBe("lapping");
  });

  it.each(["speech", "impulsive", "start-not-heard", "end-not-heard", "clipping"] as const)(
    "strokes flagged %s are left out of the server's verdict too, and counted",
    async (flag) => {
      const seat = await findSeat(db(), "MHW-0141", { speech: "4I1", impulsive: "4I2", "start-not-heard": "4E1", "end-not-heard": "4E2", clipping: "2E2" }[flag]);
      const session = await open(seat, "coarse");
      const loud = strokeInputs([6, 5, 4.5, 4, 3.8, 3.6], 1);
      const doubted = strokeInputs([0.2, 0.2, 0.2, 0.2], 7).map((s) => ({ ...s, flags: [flag] }));
      const res = await send(session, [...loud, ...doubted]);
      expect(res.strokeCount).toBe(10);
      expect(res.verdict.judgedStrokes).toBe(6);
      expect(res.verdict.leftOutStrokes).toBe(4);
      expect(res.verdict.leftOutByFlag).toEqual({ [flag]: 4 });
      expect(res.verdict.state).toBe("fading");
      // The seat read gives the same verdict from the stored strokes.
      const read = await seatRoute.GET(jsonRequest(`/api/seats/${seat}`, undefined, "GET"), { params: Promise.resolve({ seatId: seat }) });
      const report = (await read.json()) as { stages: { coarse: { verdict: SeatVerdict; strokes: Array<{ flags: string[] }> } } };
      expect(report.stages.coarse.verdict.leftOutStrokes).toBe(4);
      expect(report.stages.coarse.strokes.filter((st) => st.flags.includes(flag))).toHaveLength(4);
    },
  );

  it("strokes flagged too quiet are left out of the verdict", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3E1");
    const session = await open(seat, "fine");
    const loud = strokeInputs([6, 5, 4.5, 4, 3.8, 3.6], 1);
    const quiet = strokeInputs([0.2, 0.2, 0.2, 0.2], 7).map((s) => ({ ...s, flags: ["too-quiet" as const] }));
    const res = await send(session, [...loud, ...quiet]);
    expect(res.strokeCount).toBe(10);
    expect(res.verdict.judgedStrokes).toBe(6);
    // By hand: the four 0.2 dB strokes would satisfy the rule if they were judged.
    expect(settledAtByHand([...loud, ...quiet].map((s) => s.contrastDb))).toBe(10);
    expect(res.verdict.state).toBe("fading");
    expect(res.seatState).toBe("lapping");
  });
});
