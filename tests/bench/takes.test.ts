// The recording in progress on IndexedDB (fake-indexeddb in Node): pieces kept in order, sealed
// into the outbox as the session's recording, and found again after a reload or crash only when
// the page that recorded them is gone (its Web Lock is free, or without locks it went quiet).
import "fake-indexeddb/auto";
import { randomUUID } from "node:crypto";
import { describe, expect, it } from "vitest";
import { Outbox } from "@/lib/bench/outbox";
import { keepRecording, recoverTakes, sealTake, STALE_TAKE_MS, takeLockName, Takes } from "@/lib/bench/takes";

const neverSent = async (): Promise<Response> => {
  throw new TypeError("fetch failed");
};
const fresh = () => ({ takes: new Takes(`takes-${randomUUID()}`), outbox: new Outbox(`outbox-${randomUUID()}`, neverSent) });
const text = (b: Blob) => b.text();

/** A LockManager that holds the named locks given, as other pages would. */
function locksHeldBy(...held: string[]): LockManager {
  return {
    request: (async (name: string, options: LockOptions, cb: (lock: Lock | null) => unknown) => {
      if (!options.ifAvailable) throw new Error("only ifAvailable requests are expected");
      return cb(held.includes(name) ? null : ({ name, mode: "exclusive" } as Lock));
    }) as LockManager["request"],
    query: async () => ({ held: [], pending: [] }),
  };
}

async function record(takes: Takes, sessionId: string, seatId: string, pieces: string[], type = "audio/webm;codecs=opus") {
  for (const [seq, p] of pieces.entries()) await takes.append({ sessionId, seatId, seq, type, blob: new Blob([p]) });
}

describe("takes", () => {
  it("keeps pieces in their order, whatever order they were written in, and one per number", async () => {
    const { takes } = fresh();
    const s = randomUUID();
    await takes.append({ sessionId: s, seatId: "seat-1", seq: 2, type: "audio/mp4", blob: new Blob(["C"]) });
    await takes.append({ sessionId: s, seatId: "seat-1", seq: 0, type: "audio/mp4", blob: new Blob(["A"]) });
    await takes.append({ sessionId: s, seatId: "seat-1", seq: 1, type: "audio/mp4", blob: new Blob(["x"]) });
    await takes.append({ sessionId: s, seatId: "seat-1", seq: 1, type: "audio/mp4", blob: new Blob(["B"]) });
    await record(takes, randomUUID(), "seat-2", ["other"]);
    const whole = await takes.assemble(s);
    expect(whole).toMatchObject({ type: "audio/mp4", seatId: "seat-1" });
    expect(await text(whole!.blob)).toBe("ABC");
    expect((await takes.list()).find((t) => t.sessionId === s)).toMatchObject({ pieces: 3, bytes: 3 });
    expect(await takes.assemble(randomUUID())).toBeNull();
  });

  it("seals a take into the outbox as the session's recording once, and forgets its pieces", async () => {
    const { takes, outbox } = fresh();
    const s = randomUUID();
    await record(takes, s, "seat-1", ["one", "two", "three"]);
    expect(await sealTake(takes, outbox, s)).toBe(true);
    const ops = await outbox.all("seat-1");
    expect(ops).toHaveLength(1);
    expect(ops[0]).toMatchObject({ kind: "recording", sessionId: s, type: "audio/webm;codecs=opus" });
    expect(await text((ops[0] as { blob: Blob }).blob)).toBe("onetwothree");
    expect(await takes.list()).toEqual([]);
    // Pieces found again for a session whose recording already waits (a crash between the two steps): only forgotten.
    await record(takes, s, "seat-1", ["one"]);
    expect(await sealTake(takes, outbox, s)).toBe(false);
    expect(await outbox.all("seat-1")).toHaveLength(1);
    expect(await takes.list()).toEqual([]);
  });

  it("after a reload, recovers only takes whose page is gone, each followed by its session's end", async () => {
    const { takes, outbox } = fresh();
    const [gone, live] = [randomUUID(), randomUUID()];
    await record(takes, gone, "seat-1", ["first second ", "of lapping"]);
    await record(takes, live, "seat-2", ["still recording"]);
    const recovered = await recoverTakes(takes, outbox, { locks: locksHeldBy(takeLockName(live)) });
    expect(recovered).toEqual([{ sessionId: gone, seatId: "seat-1", type: "audio/webm;codecs=opus", pieces: 2, bytes: 23 }]);
    const ops = await outbox.all();
    expect(ops.map((op) => [op.kind, "sessionId" in op ? op.sessionId : null])).toEqual([
      ["recording", gone],
      ["end", gone],
    ]);
    expect(await text((ops[0] as { blob: Blob }).blob)).toBe("first second of lapping");
    // The take still being recorded by another page is left alone.
    expect((await takes.list()).map((t) => t.sessionId)).toEqual([live]);
    // Run again (another reload): nothing twice.
    expect(await recoverTakes(takes, outbox, { locks: locksHeldBy(takeLockName(live)) })).toEqual([]);
    expect(await outbox.all()).toHaveLength(2);
  });

  it("without Web Locks, a take counts as left behind once it has not been written to for a while", async () => {
    const { takes, outbox } = fresh();
    const s = randomUUID();
    await record(takes, s, "seat-1", ["a"]);
    expect(await recoverTakes(takes, outbox, { locks: undefined, now: Date.now() + STALE_TAKE_MS - 1000 })).toEqual([]);
    expect(await recoverTakes(takes, outbox, { locks: undefined, now: Date.now() + STALE_TAKE_MS + 1000 })).toHaveLength(1);
    expect((await outbox.all()).map((op) => op.kind)).toEqual(["recording", "end"]);
  });

  it("a recording stopped normally is taken from IndexedDB, or from memory when nothing was kept there", async () => {
    const { takes, outbox } = fresh();
    const [kept, unkept] = [randomUUID(), randomUUID()];
    await record(takes, kept, "seat-1", ["from ", "disk"]);
    await keepRecording(takes, outbox, { sessionId: kept, seatId: "seat-1", type: "audio/webm", blob: new Blob(["from memory"]) });
    await keepRecording(takes, outbox, { sessionId: unkept, seatId: "seat-1", type: "audio/mp4", blob: new Blob(["from memory"]) });
    const ops = (await outbox.all()) as Array<{ kind: string; sessionId: string; type: string; blob: Blob }>;
    expect(ops.map((op) => [op.sessionId, op.type])).toEqual([
      [kept, "audio/webm;codecs=opus"],
      [unkept, "audio/mp4"],
    ]);
    expect(await text(ops[0]!.blob)).toBe("from disk");
    expect(await text(ops[1]!.blob)).toBe("from memory");
  });
});
