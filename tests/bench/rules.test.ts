// The bench API's role and state rules through the real route handlers on a fresh database:
// who may record strokes, which seats are closed, malformed strokes, resends, and one phone per seat.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { lappingSessions } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import {
  auditFor,
  bodyOf,
  counts,
  jsonRequest,
  quietFor,
  seatId as findSeat,
  seatRow,
  sessionBody,
  setJob,
  setSeatState,
  strokeInputs,
  strokesOfSession,
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
const { SEAT_HOLD_SECONDS } = await import("@/lib/bench/service");

let ids: Map<string, string>;
const db = () => state.t!.db;

beforeAll(async () => {
  state.t = await freshPglite();
  await seedDemoShop(state.t.db);
  ids = await userIds(state.t.db);
});
afterAll(async () => {
  await state.t?.cleanup();
});

function signInAs(email: string | null) {
  state.session = email ? { user: { id: ids.get(email)! } } : null;
}

const INES = "ines@millrace.example";
const DOV = "dov@millrace.example";
const RHEA = "rhea@millrace.example";
const ADMIN = "admin@millrace.example";

function startSession(seat: string, body: unknown) {
  return sessionsRoute.POST(jsonRequest(`/api/seats/${seat}/sessions`, body), { params: Promise.resolve({ seatId: seat }) });
}
function postStrokes(sessionId: string, body: unknown) {
  return strokesRoute.POST(jsonRequest(`/api/sessions/${sessionId}/strokes`, body), { params: Promise.resolve({ sessionId }) });
}
function endSession(sessionId: string) {
  return endRoute.POST(jsonRequest(`/api/sessions/${sessionId}/end`), { params: Promise.resolve({ sessionId }) });
}

/** Opens a session as Ines on a fresh seat and returns its ids. */
async function openSession(code: string, deviceId = "phone-ines-1") {
  signInAs(INES);
  const seat = await findSeat(db(), "MHW-0141", code);
  const body = sessionBody("coarse", deviceId);
  const res = await startSession(seat, body);
  expect(res.status).toBe(201);
  return { seat, sessionId: body.sessionId };
}

describe("who may record work", () => {
  beforeEach(() => signInAs(null));

  it("refuses anonymous callers with 401 JSON on every bench route, writing nothing", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3I1");
    const before = await counts(db());
    const sessionId = randomUUID();
    const responses = [
      await startSession(seat, sessionBody("coarse", "phone-anon-1")),
      await postStrokes(sessionId, { strokes: strokeInputs([5]) }),
      await endSession(sessionId),
      await seatRoute.GET(jsonRequest(`/api/seats/${seat}`, undefined, "GET"), { params: Promise.resolve({ seatId: seat }) }),
    ];
    for (const res of responses) {
      expect(res.status).toBe(401);
      expect(await bodyOf(res)).toMatchObject({ error: "unauthorized", message: expect.any(String) });
    }
    expect(await counts(db())).toEqual(before);
  });

  it("refuses a technician on another technician's job with 403, writing nothing", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3I1");
    const before = await counts(db());
    signInAs(DOV);
    const res = await startSession(seat, sessionBody("coarse", "phone-dov-1"));
    expect(res.status).toBe(403);
    const body = await bodyOf(res);
    expect(body).toMatchObject({ error: "forbidden" });
    expect(body.message).toMatch(/MHW-0141 is assigned to another technician/);
    expect(await counts(db())).toEqual(before);
    expect((await seatRow(db(), seat)).state).toBe("waiting");
  });

  it("refuses another technician's strokes on an open session with 403", async () => {
    const { sessionId } = await openSession("3I2");
    signInAs(DOV);
    const before = await counts(db());
    const res = await postStrokes(sessionId, { strokes: strokeInputs([6]) });
    expect(res.status).toBe(403);
    expect(await counts(db())).toEqual(before);
  });

  it("refuses an admin with 403: admins do not record work", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3E1");
    const before = await counts(db());
    signInAs(ADMIN);
    const res = await startSession(seat, sessionBody("coarse", "phone-admin-1"));
    expect(res.status).toBe(403);
    expect(await bodyOf(res)).toMatchObject({ error: "forbidden", message: "Only technicians and supervisors can record work on a job." });
    expect(await counts(db())).toEqual(before);
  });

  it("lets a supervisor work on any job of the shop", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3E2");
    signInAs(RHEA);
    const body = sessionBody("coarse", "phone-rhea-1");
    const res = await startSession(seat, body);
    expect(res.status).toBe(201);
    const [row] = await db().select().from(lappingSessions).where(eq(lappingSessions.id, body.sessionId));
    expect(row!.technicianId).toBe(ids.get(RHEA));
  });

  it("lets a technician work on an unassigned job", async () => {
    await setJob(db(), "MHW-0142", { assignedTechnicianId: null });
    try {
      signInAs(INES);
      const seat = await findSeat(db(), "MHW-0142", "1I1");
      const res = await startSession(seat, sessionBody("coarse", "phone-ines-1"));
      expect(res.status).toBe(201);
    } finally {
      await setJob(db(), "MHW-0142", { assignedTechnicianId: ids.get(DOV)! });
    }
  });

  it("a started session moves a waiting seat to lapping and a queued job to the bench, with audit entries", async () => {
    signInAs(DOV);
    const seat = await findSeat(db(), "MHW-0142", "2E1");
    const body = sessionBody("coarse", "phone-dov-1");
    expect((await startSession(seat, body)).status).toBe(201);
    expect((await seatRow(db(), seat)).state).toBe("lapping");
    expect(await auditFor(db(), seat, "seat.state_changed")).toHaveLength(1);
    expect(await auditFor(db(), body.sessionId, "session.started")).toHaveLength(1);
  });
});

describe("closed seats and jobs", () => {
  beforeEach(() => signInAs(INES));

  it("refuses a new session and new strokes on a signed-off seat with 409, writing nothing", async () => {
    const { seat, sessionId } = await openSession("4I1");
    await setSeatState(db(), seat, "approved");
    const before = await counts(db());
    const newSession = await startSession(seat, sessionBody("fine", "phone-ines-1"));
    expect(newSession.status).toBe(409);
    expect((await bodyOf(newSession)).message).toMatch(/signed off/);
    const strokesRes = await postStrokes(sessionId, { strokes: strokeInputs([4, 3]) });
    expect(strokesRes.status).toBe(409);
    expect(await bodyOf(strokesRes)).toMatchObject({ error: "conflict", message: expect.stringMatching(/signed off/) });
    expect(await counts(db())).toEqual(before);
    expect((await seatRow(db(), seat)).state).toBe("approved");
  });

  it("refuses strokes and sessions on a signed-off job with 409", async () => {
    const { seat, sessionId } = await openSession("4I2");
    await setJob(db(), "MHW-0141", { status: "signed_off" });
    try {
      const before = await counts(db());
      const s = await postStrokes(sessionId, { strokes: strokeInputs([4]) });
      expect(s.status).toBe(409);
      expect((await bodyOf(s)).message).toMatch(/Job MHW-0141 is signed off/);
      expect((await startSession(seat, sessionBody("coarse", "phone-ines-1"))).status).toBe(409);
      expect(await counts(db())).toEqual(before);
    } finally {
      await setJob(db(), "MHW-0141", { status: "at_bench" });
    }
  });

  it("answers 404 for a seat or session that is not in the shop, and 400 for an id that is not a UUID", async () => {
    const missing = randomUUID();
    expect((await startSession(missing, sessionBody("coarse", "phone-ines-1"))).status).toBe(404);
    expect((await postStrokes(missing, { strokes: strokeInputs([3]) })).status).toBe(404);
    const bad = await startSession("not-a-seat", sessionBody("coarse", "phone-ines-1"));
    expect(bad.status).toBe(400);
    expect((await bodyOf(bad)).message).toMatch(/seatId/);
  });
});

describe("malformed strokes", () => {
  let sessionId: string;
  beforeAll(async () => {
    ({ sessionId } = await openSession("4E1"));
  });
  beforeEach(() => signInAs(INES));

  const cases: Array<{ name: string; edit: (s: Record<string, unknown>) => void; field: string; says: RegExp }> = [
    { name: "endS before startS", edit: (s) => (s.endS = (s.startS as number) - 0.5), field: "strokes.0.endS", says: /endS must be after startS/ },
    { name: "a clientId that is not a UUID", edit: (s) => (s.clientId = "stroke-7"), field: "strokes.0.clientId", says: /clientId must be a UUID/ },
    { name: "a contrast of 500 dB", edit: (s) => (s.contrastDb = 500), field: "strokes.0.contrastDb", says: /contrastDb above 60 dB/ },
    { name: "a missing contrast", edit: (s) => delete s.contrastDb, field: "strokes.0.contrastDb", says: /contrastDb is required/ },
    { name: "an unknown flag", edit: (s) => (s.flags = ["loud"]), field: "strokes.0.flags.0", says: /./ },
  ];

  for (const c of cases) {
    it(`refuses ${c.name} with 400 naming the field, writing nothing`, async () => {
      const stroke: Record<string, unknown> = { ...strokeInputs([2.5])[0]! };
      c.edit(stroke);
      const before = await counts(db());
      const res = await postStrokes(sessionId, { strokes: [stroke] });
      expect(res.status).toBe(400);
      const body = await bodyOf(res);
      expect(body.error).toBe("bad_request");
      expect(body.message).toMatch(new RegExp(`^${c.field.replace(/\./g, "\\.")}: `));
      expect(body.message).toMatch(c.says);
      expect(Object.keys(body.fieldErrors as object)).toContain(c.field);
      expect(await counts(db())).toEqual(before);
    });
  }

  it("refuses a whole batch when one stroke in it is malformed", async () => {
    const batch: Array<Record<string, unknown>> = strokeInputs([3, 2.5, 2]);
    batch[1]!.contrastDb = -500;
    const before = await counts(db());
    const res = await postStrokes(sessionId, { strokes: batch });
    expect(res.status).toBe(400);
    expect((await bodyOf(res)).message).toMatch(/^strokes\.1\.contrastDb: /);
    expect(await counts(db())).toEqual(before);
  });

  it("refuses a body that is not JSON, and an empty batch, with 400", async () => {
    const notJson = await postStrokes(sessionId, "{strokes: [");
    expect(notJson.status).toBe(400);
    expect((await bodyOf(notJson)).message).toBe("The request body must be JSON.");
    const empty = await postStrokes(sessionId, { strokes: [] });
    expect(empty.status).toBe(400);
    expect((await bodyOf(empty)).message).toMatch(/^strokes: Send at least one stroke/);
  });

  it("refuses a malformed session start with 400 naming the field", async () => {
    const seat = await findSeat(db(), "MHW-0141", "4E2");
    const before = await counts(db());
    const res = await startSession(seat, { ...sessionBody("coarse", "phone-ines-1"), stage: "polish" });
    expect(res.status).toBe(400);
    expect((await bodyOf(res)).message).toMatch(/^stage: Stage must be coarse or fine/);
    const res2 = await startSession(seat, { ...sessionBody("coarse", "phone-ines-1"), sessionId: "abc" });
    expect((await bodyOf(res2)).message).toMatch(/^sessionId: /);
    expect(await counts(db())).toEqual(before);
  });
});

describe("resends are harmless", () => {
  beforeEach(() => signInAs(INES));

  it("a stroke sent again with the same clientId is counted as a duplicate, not stored twice", async () => {
    const { sessionId } = await openSession("2E1");
    const batch = strokeInputs([9, 8, 7]);
    const first = await postStrokes(sessionId, { strokes: batch });
    expect(first.status).toBe(201);
    expect(await bodyOf(first)).toMatchObject({ accepted: 3, duplicates: 0, strokeCount: 3 });
    const again = await postStrokes(sessionId, { strokes: [batch[1]] });
    expect(again.status).toBe(200);
    expect(await bodyOf(again)).toMatchObject({ accepted: 0, duplicates: 1, strokeCount: 3 });
    // A batch mixing a stroke already saved with a new one keeps only the new one.
    const [next] = strokeInputs([6], 4);
    const mixed = await postStrokes(sessionId, { strokes: [batch[2], next] });
    expect(await bodyOf(mixed)).toMatchObject({ accepted: 1, duplicates: 1, strokeCount: 4 });
    const stored = await strokesOfSession(db(), sessionId);
    expect(stored.map((s) => s.clientId).sort()).toEqual([...batch, next!].map((s) => s.clientId).sort());
  });

  it("the same batch sent twice at once is stored once", async () => {
    const { sessionId } = await openSession("1I1");
    const batch = strokeInputs([8, 7, 6, 5]);
    const answers = await Promise.all([postStrokes(sessionId, { strokes: batch }), postStrokes(sessionId, { strokes: batch })]);
    const bodies = await Promise.all(answers.map(bodyOf));
    expect(bodies.map((b) => b.accepted).sort()).toEqual([0, batch.length]);
    expect(bodies.map((b) => b.duplicates).sort()).toEqual([0, batch.length]);
    expect(await strokesOfSession(db(), sessionId)).toHaveLength(batch.length);
  });

  it("the same clientId twice in one batch is stored once", async () => {
    const { sessionId } = await openSession("2E2");
    const [s] = strokeInputs([5]);
    const res = await postStrokes(sessionId, { strokes: [s, s] });
    expect(await bodyOf(res)).toMatchObject({ accepted: 1, duplicates: 1 });
    expect(await strokesOfSession(db(), sessionId)).toHaveLength(1);
  });

  it("a session start sent again resumes the same session", async () => {
    const seat = await findSeat(db(), "MHW-0141", "3I1");
    const body = sessionBody("coarse", "phone-ines-1");
    expect((await startSession(seat, body)).status).toBe(201);
    const before = await counts(db());
    const again = await startSession(seat, body);
    expect(again.status).toBe(200);
    expect(await bodyOf(again)).toEqual({ sessionId: body.sessionId, resumed: true });
    expect((await counts(db())).sessions).toBe(before.sessions);
    // The same id cannot be reused for another stage.
    const other = await startSession(seat, { ...body, stage: "fine" });
    expect(other.status).toBe(409);
    await endSession(body.sessionId);
  });

  it("ending a session twice is harmless", async () => {
    const { sessionId } = await openSession("2I1");
    expect((await endSession(sessionId)).status).toBe(200);
    const before = await counts(db());
    expect((await endSession(sessionId)).status).toBe(200);
    expect(await counts(db())).toEqual(before);
  });
});

describe("one phone per seat", () => {
  it(`a second phone is told the seat is busy while the first was heard from within ${SEAT_HOLD_SECONDS} s`, async () => {
    const { seat, sessionId: first } = await openSession("1E1", "phone-ines-A");
    signInAs(RHEA);
    const before = await counts(db());
    const second = sessionBody("coarse", "phone-rhea-B");
    const busy = await startSession(seat, second);
    expect(busy.status).toBe(409);
    expect((await bodyOf(busy)).message).toMatch(/busy: Ines Marlow's phone is listening/);
    expect(await counts(db())).toEqual(before);

    // Quiet for just under the hold: still held.
    await quietFor(db(), first, SEAT_HOLD_SECONDS - 5);
    expect((await startSession(seat, second)).status).toBe(409);

    // Quiet past the hold, but then a stroke arrives: the stroke is a sign of life.
    await quietFor(db(), first, SEAT_HOLD_SECONDS + 5);
    signInAs(INES);
    expect((await postStrokes(first, { strokes: strokeInputs([7]) })).status).toBe(201);
    signInAs(RHEA);
    expect((await startSession(seat, second)).status).toBe(409);

    // Quiet past the hold with nothing since: the seat is free.
    await quietFor(db(), first, SEAT_HOLD_SECONDS + 5);
    const taken = await startSession(seat, second);
    expect(taken.status).toBe(201);
    expect(await bodyOf(taken)).toEqual({ sessionId: second.sessionId, resumed: false });
    // And now the first phone, coming back with a new session, is the one told to wait.
    signInAs(INES);
    expect((await startSession(seat, sessionBody("coarse", "phone-ines-A"))).status).toBe(409);
  });

  it("an ended session frees the seat at once", async () => {
    const { seat, sessionId } = await openSession("1E2", "phone-ines-A");
    signInAs(RHEA);
    expect((await startSession(seat, sessionBody("coarse", "phone-rhea-B"))).status).toBe(409);
    signInAs(INES);
    await endSession(sessionId);
    signInAs(RHEA);
    expect((await startSession(seat, sessionBody("coarse", "phone-rhea-B"))).status).toBe(201);
  });

  it("the same phone may start another session on its seat, and resumes its own", async () => {
    const { seat, sessionId } = await openSession("2I2", "phone-ines-A");
    const resumed = await startSession(seat, sessionBody("coarse", "phone-ines-A", sessionId));
    expect(resumed.status).toBe(200);
    expect(await bodyOf(resumed)).toMatchObject({ sessionId, resumed: true });
    expect((await startSession(seat, sessionBody("fine", "phone-ines-A"))).status).toBe(201);
  });
});
