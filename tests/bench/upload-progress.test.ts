// The outbox reports how far a recording's upload has gone, chunk by chunk, and how it ended.
import "fake-indexeddb/auto";
import { randomUUID } from "node:crypto";
import { describe, expect, it } from "vitest";
import { Outbox, RECORDING_CHUNK_BYTES, type UploadProgress } from "@/lib/bench/outbox";

/** A chunk endpoint that keeps what it is sent, as app/api/sessions/[id]/recording/chunks does. */
function chunkServer(failAfterChunks = Infinity) {
  let received = 0;
  let total: number | null = null;
  let chunks = 0;
  const fetchFn = async (_url: string, init?: RequestInit): Promise<Response> => {
    if ((init?.method ?? "GET") === "GET") return Response.json({ received, total });
    if (chunks >= failAfterChunks) throw new TypeError("fetch failed");
    const m = /bytes (\d+)-(\d+)\/(\d+)/.exec(new Headers(init!.headers).get("content-range")!)!;
    received = Number(m[2]) + 1;
    total = Number(m[3]);
    chunks += 1;
    return received === Number(m[3]) ? Response.json({ ok: true, bytes: received }, { status: 201 }) : Response.json({ received, total: Number(m[3]) });
  };
  return { fetchFn, chunks: () => chunks };
}

describe("recording upload progress", () => {
  it("rises chunk by chunk to the whole size, then says done", async () => {
    const server = chunkServer();
    const box = new Outbox(`progress-${randomUUID()}`, server.fetchFn);
    const seen: UploadProgress[] = [];
    box.onUploadProgress((p) => seen.push(p));
    const size = 2 * RECORDING_CHUNK_BYTES + 1000;
    const sessionId = randomUUID();
    await box.add({ kind: "recording", seatId: "seat-1", sessionId, type: "audio/mp4", blob: new Blob([new Uint8Array(size)]) });
    expect((await box.flush()).sent).toBe(1);
    expect(server.chunks()).toBe(3);
    const received = seen.map((p) => p.received);
    expect(received).toEqual([...received].sort((a, b) => a - b));
    expect(received).toEqual(expect.arrayContaining([0, RECORDING_CHUNK_BYTES, 2 * RECORDING_CHUNK_BYTES, size]));
    expect(seen.every((p) => p.total === size && p.sessionId === sessionId && p.seatId === "seat-1")).toBe(true);
    expect(seen.at(-1)!.state).toBe("done");
    expect(seen.slice(0, -1).every((p) => p.state === "sending")).toBe(true);
  });

  it("says stopped, with what arrived, when the network drops; a listener removed hears nothing more", async () => {
    const server = chunkServer(1);
    const box = new Outbox(`progress-${randomUUID()}`, server.fetchFn);
    const seen: UploadProgress[] = [];
    const off = box.onUploadProgress((p) => seen.push(p));
    await box.add({ kind: "recording", seatId: "seat-1", sessionId: randomUUID(), type: "audio/webm", blob: new Blob([new Uint8Array(RECORDING_CHUNK_BYTES * 2)]) });
    expect((await box.flush()).stoppedBy).toBe("offline");
    expect(seen.at(-1)).toMatchObject({ state: "stopped", received: RECORDING_CHUNK_BYTES });
    off();
    const count = seen.length;
    await box.flush();
    expect(seen.length).toBe(count);
  });
});
