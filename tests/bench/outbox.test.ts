// The phone's outbox on IndexedDB (fake-indexeddb in Node) with a scripted network: order,
// batching, resend after failures, refusals that are kept but never resent, and shared flushes.
import "fake-indexeddb/auto";
import { randomUUID } from "node:crypto";
import { describe, expect, it, vi } from "vitest";
import { Outbox, SERVER_FAILURE_TRIES, type OutboxOp } from "@/lib/bench/outbox";
import type { StrokeInput } from "@/lib/validations/bench";
import { sessionBody, strokeInputs } from "./helpers";

interface Call {
  url: string;
  method: string;
  body: unknown;
  contentType: string | null;
}

type Reply = Response | Error | ((call: Call) => Response | Error);

/** A network that records every request and answers from a script (default: 200 with accepted counts). */
function scriptedNetwork() {
  const calls: Call[] = [];
  const script: Reply[] = [];
  const fetchFn = async (url: string, init?: RequestInit): Promise<Response> => {
    const headers = new Headers(init?.headers);
    const raw = init?.body;
    const body = typeof raw === "string" ? (JSON.parse(raw) as unknown) : raw instanceof Blob ? await raw.text() : null;
    const call: Call = { url, method: init?.method ?? "GET", body, contentType: headers.get("content-type") };
    calls.push(call);
    let reply = script.shift() ?? defaultReply;
    if (typeof reply === "function") reply = reply(call);
    if (reply instanceof Error) throw reply;
    return reply;
  };
  const defaultReply = (call: Call): Response => {
    const strokes = (call.body as { strokes?: StrokeInput[] } | null)?.strokes;
    return Response.json(strokes ? { accepted: strokes.length, duplicates: 0 } : { ok: true }, { status: 201 });
  };
  return { calls, script, fetchFn };
}

const offline = () => new TypeError("fetch failed");
const refusal = (status: number, message: string) => Response.json({ error: "x", message }, { status });

function newOutbox(net: ReturnType<typeof scriptedNetwork>) {
  return new Outbox(`outbox-test-${randomUUID()}`, net.fetchFn);
}

/** A session start with its strokes, as the bench screen queues them. */
function sessionOps(seatId: string, contrasts: number[]) {
  const body = sessionBody("coarse", "phone-test-1");
  const strokes = strokeInputs(contrasts);
  const ops: OutboxOp[] = [
    { kind: "session", seatId, body },
    ...strokes.map((stroke): OutboxOp => ({ kind: "stroke", seatId, sessionId: body.sessionId, stroke })),
  ];
  return { sessionId: body.sessionId, strokes, ops };
}

async function addAll(box: Outbox, ops: OutboxOp[]) {
  for (const op of ops) await box.add(op);
}

const sentStrokeIds = (calls: Call[]) =>
  calls.flatMap((c) => ((c.body as { strokes?: StrokeInput[] } | null)?.strokes ?? []).map((s) => s.clientId));

describe("Outbox", () => {
  it("sends a session before its strokes, batches consecutive strokes, then the end, and empties itself", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { sessionId, strokes, ops } = sessionOps(seat, [9, 8, 7]);
    await addAll(box, [...ops, { kind: "end", seatId: seat, sessionId }]);
    expect(await box.count()).toBe(5);

    const report = await box.flush();
    expect(net.calls.map((c) => `${c.method} ${c.url}`)).toEqual([
      `POST /api/seats/${seat}/sessions`,
      `POST /api/sessions/${sessionId}/strokes`,
      `POST /api/sessions/${sessionId}/end`,
    ]);
    expect(net.calls[0]!.body).toMatchObject({ sessionId, stage: "coarse" });
    expect(net.calls[1]!.body).toEqual({ strokes });
    expect(report).toMatchObject({ sent: 5, pending: 0, refused: [], stoppedBy: "done" });
    expect(await box.count()).toBe(0);
  });

  it("does not batch across sessions, and splits long runs of strokes", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const a = sessionOps(seat, Array.from({ length: 250 }, () => 5));
    const b = sessionOps(seat, [4, 3]);
    await addAll(box, [...a.ops, ...b.ops]);
    const report = await box.flush();
    const batches = net.calls.filter((c) => c.url.endsWith("/strokes"));
    expect(batches.map((c) => [c.url.split("/")[3], (c.body as { strokes: unknown[] }).strokes.length])).toEqual([
      [a.sessionId, 200],
      [a.sessionId, 50],
      [b.sessionId, 2],
    ]);
    expect(sentStrokeIds(net.calls)).toEqual([...a.strokes, ...b.strokes].map((s) => s.clientId));
    expect(report.sent).toBe(254);
  });

  it("keeps everything when the network is gone, and sends it all, once, when it returns", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { sessionId, strokes, ops } = sessionOps(seat, [9, 8, 7, 6]);
    await box.add(ops[0]!);
    await box.add(ops[1]!);
    net.script.push(new Response(JSON.stringify({ sessionId: "x", resumed: false }), { status: 201 }), offline());
    const first = await box.flush();
    expect(first).toMatchObject({ sent: 1, pending: 1, stoppedBy: "offline", refused: [] });

    // Still offline while more strokes are heard.
    for (const op of ops.slice(2)) {
      await box.add(op);
      net.script.push(offline());
      expect((await box.flush()).stoppedBy).toBe("offline");
    }
    expect(await box.pendingStrokes(seat)).toEqual(strokes.map((stroke) => ({ sessionId, stroke })));

    const back = await box.flush();
    expect(back).toMatchObject({ sent: 4, pending: 0, stoppedBy: "done" });
    // Every attempt carried the same client-made ids, and the last one carried all of them in order.
    const last = net.calls[net.calls.length - 1]!;
    expect((last.body as { strokes: StrokeInput[] }).strokes.map((s) => s.clientId)).toEqual(strokes.map((s) => s.clientId));
    expect(await box.count()).toBe(0);
  });

  it("drops a stroke the server already has (a resend after a lost answer)", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const sessionId = randomUUID();
    await box.add({ kind: "stroke", seatId: seat, sessionId, stroke: strokeInputs([3])[0]! });
    net.script.push(Response.json({ accepted: 0, duplicates: 1, strokeCount: 7 }, { status: 200 }));
    const report = await box.flush();
    expect(report).toMatchObject({ sent: 1, pending: 0, stoppedBy: "done", lastBody: { duplicates: 1 } });
    expect(await box.count()).toBe(0);
  });

  for (const status of [400, 403, 409]) {
    it(`marks ops refused with ${status} as failed, keeps them, and never resends them`, async () => {
      const net = scriptedNetwork();
      const box = newOutbox(net);
      const seat = randomUUID();
      const sessionId = randomUUID();
      const [refused, later] = strokeInputs([3, 2]);
      await box.add({ kind: "stroke", seatId: seat, sessionId, stroke: refused! });
      await box.add({ kind: "end", seatId: seat, sessionId });
      await box.add({ kind: "stroke", seatId: seat, sessionId: randomUUID(), stroke: later! });
      net.script.push(refusal(status, `Refused for a reason ${status}.`));
      const report = await box.flush();
      expect(report.refused.map((r) => r.message)).toEqual([`Refused for a reason ${status}.`]);
      // A refusal does not stop what follows it.
      expect(report).toMatchObject({ sent: 2, pending: 0, stoppedBy: "done" });
      const kept = await box.all();
      expect(kept).toHaveLength(1);
      expect(kept[0]).toMatchObject({ kind: "stroke", failed: `Refused for a reason ${status}.` });

      const callsBefore = net.calls.length;
      const again = await box.flush();
      expect(net.calls.length).toBe(callsBefore);
      expect(again).toMatchObject({ sent: 0, pending: 0, refused: [] });
      await box.clearFailed();
      expect(await box.count()).toBe(0);
    });
  }

  it("never sends the strokes, end or recording of a session the server refused, now or later", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { sessionId, ops } = sessionOps(seat, [8, 7]);
    await addAll(box, ops);
    net.script.push(refusal(409, "Seat 3I1 is busy: Ines Marlow's phone is listening to it."));
    const first = await box.flush();
    expect(net.calls.map((c) => c.url)).toEqual([`/api/seats/${seat}/sessions`]);
    expect(first.refused.map((r) => r.message)).toEqual(["Seat 3I1 is busy: Ines Marlow's phone is listening to it."]);
    expect(first.pending).toBe(0);

    // The phone keeps listening for a moment: more of that session arrives after the refusal.
    await box.add({ kind: "stroke", seatId: seat, sessionId, stroke: strokeInputs([6], 3)[0]! });
    await box.add({ kind: "recording", seatId: seat, sessionId, type: "audio/webm", blob: new Blob(["webm"]) });
    await box.add({ kind: "end", seatId: seat, sessionId });
    const second = await box.flush();
    expect(net.calls).toHaveLength(1);
    expect(second).toMatchObject({ sent: 0, pending: 0 });
    // Kept on the phone, each marked with why.
    const kept = await box.all(seat);
    expect(kept).toHaveLength(6);
    expect(kept.every((op) => /busy/.test(op.failed ?? ""))).toBe(true);
  });

  it("stops at 401 as signed out, keeping everything unmarked for after sign-in", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const { ops } = sessionOps(randomUUID(), [5, 4]);
    await addAll(box, ops);
    net.script.push(refusal(401, "Sign in to continue."));
    const report = await box.flush();
    expect(report).toMatchObject({ sent: 0, pending: 3, stoppedBy: "signed-out", refused: [] });
    expect((await box.all()).some((op) => op.failed)).toBe(false);
    expect((await box.flush()).sent).toBe(3);
  });

  it("after a 500 on a batch, sends its strokes one by one at once, so only a stroke it fails on waits", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const { ops, strokes } = sessionOps(randomUUID(), [5, 4]);
    await addAll(box, ops);
    net.script.push(Response.json({ sessionId: "x" }, { status: 201 }), refusal(500, "Try again."));
    expect(await box.flush()).toMatchObject({ sent: 3, pending: 0, stoppedBy: "done", refused: [], setAside: [] });
    expect(net.calls.slice(-2).map((c) => sentStrokeIds([c]))).toEqual(strokes.map((s) => [s.clientId]));
  });

  for (const status of [503, 429]) {
    it(`retries after ${status}: stops, keeps the op, and sends it on the next flush`, async () => {
      const net = scriptedNetwork();
      const box = newOutbox(net);
      const { ops, strokes } = sessionOps(randomUUID(), [5, 4]);
      await addAll(box, ops);
      net.script.push(Response.json({ sessionId: "x" }, { status: 201 }), refusal(status, "Try again."));
      const report = await box.flush();
      expect(report).toMatchObject({ sent: 1, pending: 2, stoppedBy: "server", refused: [] });
      await box.flush();
      expect(sentStrokeIds(net.calls.slice(-1))).toEqual(strokes.map((s) => s.clientId));
      expect(await box.count()).toBe(0);
    });
  }

  it("retries the good strokes of a batch one by one when one stroke in it is malformed", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const sessionId = randomUUID();
    const strokes = strokeInputs([5, 4, 3]);
    for (const stroke of strokes) await box.add({ kind: "stroke", seatId: seat, sessionId, stroke });
    const bad = strokes[1]!.clientId;
    // A server that refuses any batch holding the bad stroke, as the real one does.
    const judge = (call: Call): Response => {
      const batch = (call.body as { strokes: StrokeInput[] }).strokes;
      const at = batch.findIndex((s) => s.clientId === bad);
      if (at >= 0) return refusal(400, `strokes.${at}.contrastDb: contrastDb above 60 dB is not plausible.`);
      return Response.json({ accepted: batch.length, duplicates: 0 }, { status: 201 });
    };
    net.script.push(judge, judge, judge, judge);
    const report = await box.flush();
    expect(report).toMatchObject({ sent: 2, pending: 0 });
    expect(report.refused).toHaveLength(1);
    const kept = await box.all();
    expect(kept.map((op) => (op.kind === "stroke" ? op.stroke.clientId : null))).toEqual([bad]);
    expect(kept[0]!.failed).toMatch(/contrastDb/);
  });

  it("sends a recording through the resumable chunk upload: asks what the server has, then sends the rest", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const sessionId = randomUUID();
    await box.add({ kind: "recording", seatId: seat, sessionId, type: "audio/ogg", blob: new Blob(["OggS-bytes"], { type: "audio/ogg" }) });
    await box.flush();
    const url = `/api/sessions/${sessionId}/recording/chunks`;
    expect(net.calls.map((c) => [c.method, c.url, c.body])).toEqual([
      ["GET", url, null],
      ["PUT", url, "OggS-bytes"],
    ]);
    expect(await box.count()).toBe(0);
  });

  it("concurrent flushes share one run and send each op once", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const { ops } = sessionOps(randomUUID(), [5, 4, 3]);
    await addAll(box, ops);
    const [a, b, c] = [box.flush(), box.flush(), box.flush()];
    expect(b).toBe(a);
    expect(c).toBe(a);
    expect((await a).sent).toBe(4);
    expect(net.calls).toHaveLength(2);
    // Once finished, a new flush is a new run.
    await box.add(sessionOps(randomUUID(), []).ops[0]!);
    const next = box.flush();
    expect(next).not.toBe(a);
    expect((await next).sent).toBe(1);
  });

  it("an op added while a flush runs goes out in the same flush, not at the next tick", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const first = sessionOps(randomUUID(), [5]);
    await addAll(box, first.ops);
    const running = box.flush();
    // Added after the run read its list: only a second pass can send it.
    const late = sessionOps(randomUUID(), [2]);
    await addAll(box, late.ops);
    const again = box.flush();
    expect(again).toBe(running);
    const report = await running;
    expect(report.sent).toBe(first.ops.length + late.ops.length);
    expect(report.pending).toBe(0);
    expect(await box.count()).toBe(0);
  });

  it("lists a seat's pending strokes only, across reopening the store", async () => {
    const net = scriptedNetwork();
    const name = `outbox-test-${randomUUID()}`;
    const box = new Outbox(name, net.fetchFn);
    const mine = sessionOps("seat-a", [5, 4]);
    const other = sessionOps("seat-b", [3]);
    await addAll(box, [...mine.ops, ...other.ops]);
    // A reload: a new Outbox on the same store still has them.
    const reopened = new Outbox(name, net.fetchFn);
    expect((await reopened.pendingStrokes("seat-a")).map((p) => p.stroke.clientId)).toEqual(mine.strokes.map((s) => s.clientId));
    expect(await reopened.count()).toBe(5);
  });

  it("gives a pending stroke its session's stage while that session has not reached the server", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    // Begun offline: the session and its strokes all wait, so only the outbox knows the stage.
    const body = sessionBody("fine", "phone-test-1");
    const strokes = strokeInputs([6, 5]);
    await addAll(box, [
      { kind: "session", seatId: seat, body },
      ...strokes.map((stroke): OutboxOp => ({ kind: "stroke", seatId: seat, sessionId: body.sessionId, stroke })),
    ]);
    expect((await box.pendingStrokes(seat)).map((p) => [p.sessionId, p.stage])).toEqual([
      [body.sessionId, "fine"],
      [body.sessionId, "fine"],
    ]);
    // Once the server has the session, its strokes are placed by the server's sessions instead.
    net.script.push(Response.json({ sessionId: body.sessionId, resumed: false }, { status: 201 }), offline());
    expect(await box.flush()).toMatchObject({ sent: 1, stoppedBy: "offline" });
    const after = await box.pendingStrokes(seat);
    expect(after.map((p) => p.stroke.clientId)).toEqual(strokes.map((s) => s.clientId));
    expect(after.every((p) => p.stage === undefined)).toBe(true);
  });

  it("sets aside a stroke the server keeps failing on, after backing off, and sends the strokes behind it", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { sessionId, strokes, ops } = sessionOps(seat, [9, 8, 7, 6, 5]);
    const bad = strokes[1]!.clientId;
    // The server fails (500) on any request carrying the bad stroke, and takes the others.
    const failsOnBad = (call: Call): Response => {
      const sent = (call.body as { strokes?: StrokeInput[] } | null)?.strokes;
      if (sent?.some((x) => x.clientId === bad)) return Response.json({ error: "internal", message: "Something went wrong on the server. (req-42)" }, { status: 500 });
      return Response.json(sent ? { accepted: sent.length, duplicates: 0 } : { ok: true }, { status: 201 });
    };
    for (let n = 0; n < 40; n++) net.script.push(failsOnBad);
    await addAll(box, [...ops, { kind: "end", seatId: seat, sessionId }]);
    let now = Date.now();
    const clock = vi.spyOn(Date, "now").mockImplementation(() => now);
    try {
      const first = await box.flush();
      // The batch is split; the bad one waits, backing off, and every stroke behind it is saved
      // in the same flush: one bad stroke does not hold the queue.
      expect(first).toMatchObject({ stoppedBy: "server", setAside: [], pending: 2 });
      expect(sentStrokeIds(net.calls.filter((c) => c.url.endsWith("/strokes") && !JSON.stringify(c.body).includes(bad)))).toEqual(
        [0, 2, 3, 4].map((k) => strokes[k]!.clientId),
      );
      // The session's end waits for the stroke backing off (its recording would too).
      expect(net.calls.some((c) => c.url.endsWith("/end"))).toBe(false);
      // Backing off: a flush before the wait is over sends nothing.
      const calls = net.calls.length;
      expect((await box.flush()).stoppedBy).toBe("server");
      expect(net.calls.length).toBe(calls);
      let report = first;
      let tries = 1;
      while (report.setAside.length === 0 && tries < 10) {
        now += 60_000;
        report = await box.flush();
        tries++;
      }
      expect(tries).toBe(SERVER_FAILURE_TRIES);
      expect(report.setAside).toEqual([{ op: expect.objectContaining({ stroke: strokes[1] }), message: "Something went wrong on the server. (req-42)" }]);
      expect(report).toMatchObject({ stoppedBy: "done", pending: 0 });
      // The strokes behind it went on; the bad one is kept on the phone, never dropped.
      expect(new Set(sentStrokeIds(net.calls.filter((c) => !JSON.stringify(c.body).includes(bad))))).toEqual(new Set([0, 2, 3, 4].map((k) => strokes[k]!.clientId)));
      expect((await box.setAsideOps(seat)).map((op) => (op as { stroke: StrokeInput }).stroke.clientId)).toEqual([bad]);
      expect(await box.count()).toBe(1);
      expect((await box.pendingStrokes(seat)).map((p) => p.stroke.clientId)).toEqual([bad]);
      // Later flushes leave it alone until someone sends it again; then it goes.
      const before = net.calls.length;
      expect(await box.flush()).toMatchObject({ sent: 0, stoppedBy: "done" });
      expect(net.calls.length).toBe(before);
      net.script.length = 0;
      await box.retrySetAside(seat);
      expect(await box.flush()).toMatchObject({ sent: 1, pending: 0, stoppedBy: "done" });
      expect(await box.count()).toBe(0);
    } finally {
      clock.mockRestore();
    }
    expect(sessionId).toBeTruthy();
  });

  it("waits out a server that is away (503, 502) without setting anything aside", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { ops } = sessionOps(seat, [9, 8]);
    await addAll(box, ops);
    for (let n = 0; n < 12; n++) {
      net.script.push(refusal(n % 2 ? 502 : 503, "Grindfade is restarting."));
      const report = await box.flush();
      expect(report).toMatchObject({ stoppedBy: "server", setAside: [] });
    }
    expect(await box.setAsideOps()).toEqual([]);
    expect(await box.flush()).toMatchObject({ sent: 3, pending: 0, stoppedBy: "done" });
  });

  it("sets aside what was recorded in a session the server kept failing to start", async () => {
    const net = scriptedNetwork();
    const box = newOutbox(net);
    const seat = randomUUID();
    const { sessionId, ops } = sessionOps(seat, [9, 8]);
    await addAll(box, [...ops, { kind: "end", seatId: seat, sessionId }]);
    let now = Date.now();
    const clock = vi.spyOn(Date, "now").mockImplementation(() => now);
    const aside: unknown[] = [];
    try {
      for (let n = 0; n < SERVER_FAILURE_TRIES; n++) {
        net.script.push(refusal(500, "The server failed."));
        aside.push(...(await box.flush()).setAside);
        now += 60_000;
      }
    } finally {
      clock.mockRestore();
    }
    expect(aside).toHaveLength(4);
    expect(net.calls.every((c) => c.url.endsWith("/sessions"))).toBe(true);
    expect(await box.count()).toBe(4);
    expect((await box.setAsideOps(seat)).every((op) => op.setAside === "The server failed.")).toBe(true);
  });
});
