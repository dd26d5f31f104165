// A recording in progress, kept on the phone as it is made: every piece the MediaRecorder hands
// over (about one a second) is written to IndexedDB at once, so a reload or a crash of the page
// loses at most the last piece. When listening stops the pieces become one recording in the
// outbox; pieces left behind by a page that died are found on the next visit and go the same way.
//
// A page recording a take holds a Web Lock named after its session for as long as it records;
// the browser releases it when the page goes, so a take whose lock is free was left behind.
// Without Web Locks, a take not written to for STALE_TAKE_MS counts as left behind.
import { openDB, type DBSchema, type IDBPDatabase } from "idb";
import type { Outbox } from "./outbox";

export interface TakePiece {
  sessionId: string;
  seq: number;
  seatId: string;
  /** The recorder's MIME type (the same for every piece of a take). */
  type: string;
  blob: Blob;
  at: number;
}

interface TakesSchema extends DBSchema {
  pieces: { key: [string, number]; value: TakePiece; indexes: { bySession: string } };
}

/** A take not written to for this long, on a browser without Web Locks, was left behind. */
export const STALE_TAKE_MS = 15_000;

export const takeLockName = (sessionId: string) => `grindfade-take-${sessionId}`;

export interface LeftTake {
  sessionId: string;
  seatId: string;
  type: string;
  pieces: number;
  bytes: number;
}

export class Takes {
  private dbp: Promise<IDBPDatabase<TakesSchema>>;

  constructor(name = "grindfade-takes") {
    this.dbp = openDB<TakesSchema>(name, 1, {
      upgrade(db) {
        const store = db.createObjectStore("pieces", { keyPath: ["sessionId", "seq"] });
        store.createIndex("bySession", "sessionId");
      },
    });
  }

  /** Keeps one piece; a piece of the same number written again replaces the first. */
  async append(piece: Omit<TakePiece, "at">): Promise<void> {
    await (await this.dbp).put("pieces", { ...piece, at: Date.now() });
  }

  async pieces(sessionId: string): Promise<TakePiece[]> {
    const all = await (await this.dbp).getAllFromIndex("pieces", "bySession", sessionId);
    return all.sort((a, b) => a.seq - b.seq);
  }

  /** The take as one recording, pieces in order; null when nothing of it is kept. */
  async assemble(sessionId: string): Promise<{ blob: Blob; type: string; seatId: string } | null> {
    const pieces = await this.pieces(sessionId);
    if (!pieces.length) return null;
    const type = pieces[0]!.type;
    return {
      blob: new Blob(
        pieces.map((p) => p.blob),
        { type },
      ),
      type,
      seatId: pieces[0]!.seatId,
    };
  }

  async discard(sessionId: string): Promise<void> {
    const db = await this.dbp;
    const tx = db.transaction("pieces", "readwrite");
    const keys = await tx.store.index("bySession").getAllKeys(sessionId);
    await Promise.all([...keys.map((k) => tx.store.delete(k)), tx.done]);
  }

  /** Every take kept here, with its size. */
  async list(): Promise<Array<LeftTake & { lastAt: number }>> {
    const all = await (await this.dbp).getAll("pieces");
    const by = new Map<string, LeftTake & { lastAt: number }>();
    for (const p of all) {
      const t = by.get(p.sessionId) ?? {
        sessionId: p.sessionId,
        seatId: p.seatId,
        type: p.type,
        pieces: 0,
        bytes: 0,
        lastAt: 0,
      };
      t.pieces += 1;
      t.bytes += p.blob.size;
      t.lastAt = Math.max(t.lastAt, p.at);
      by.set(p.sessionId, t);
    }
    return [...by.values()];
  }
}

/** Whether the page that recorded a take is gone: its lock is free, or (without locks) it went quiet. */
async function leftBehind(
  take: { sessionId: string; lastAt: number },
  now: number,
  locks: LockManager | undefined,
): Promise<boolean> {
  if (!locks) return now - take.lastAt > STALE_TAKE_MS;
  // ifAvailable: the callback gets null at once when another page holds the lock.
  return locks.request(
    takeLockName(take.sessionId),
    { ifAvailable: true },
    (lock) => lock !== null,
  );
}

/**
 * Turns a take into its session's recording in the outbox, then forgets the pieces. A take of a
 * session whose recording is already waiting in the outbox (the page died between the two
 * steps) is only forgotten.
 */
export async function sealTake(takes: Takes, outbox: Outbox, sessionId: string): Promise<boolean> {
  const take = await takes.assemble(sessionId);
  if (!take) return false;
  const waiting = (await outbox.all(take.seatId)).some(
    (op) => op.kind === "recording" && op.sessionId === sessionId,
  );
  if (!waiting)
    await outbox.add({
      kind: "recording",
      seatId: take.seatId,
      sessionId,
      type: take.type,
      blob: take.blob,
    });
  await takes.discard(sessionId);
  return !waiting;
}

/**
 * Finds takes left behind by a page that reloaded or crashed while recording and queues each as
 * its session's recording, with the session's end after it (the page never sent one). Returns
 * what was recovered.
 */
export async function recoverTakes(
  takes: Takes,
  outbox: Outbox,
  options: { now?: number; locks?: LockManager | undefined } = {},
): Promise<LeftTake[]> {
  const now = options.now ?? Date.now();
  const locks =
    "locks" in options
      ? options.locks
      : typeof navigator !== "undefined"
        ? navigator.locks
        : undefined;
  const recovered: LeftTake[] = [];
  for (const take of await takes.list()) {
    if (!(await leftBehind(take, now, locks))) continue;
    await sealTake(takes, outbox, take.sessionId);
    const ops = await outbox.all(take.seatId);
    if (!ops.some((op) => op.kind === "end" && op.sessionId === take.sessionId)) {
      await outbox.add({ kind: "end", seatId: take.seatId, sessionId: take.sessionId });
    }
    const { lastAt: _at, ...left } = take;
    recovered.push(left);
  }
  return recovered;
}

/**
 * The recording of a session that stopped normally: its take becomes the recording (what
 * IndexedDB kept is what was recorded), or, when nothing could be kept there (storage refused),
 * the recording held in memory is queued instead.
 */
export async function keepRecording(
  takes: Takes,
  outbox: Outbox,
  recording: { sessionId: string; seatId: string; type: string; blob: Blob },
): Promise<void> {
  try {
    if (await sealTake(takes, outbox, recording.sessionId)) return;
    if (
      (await outbox.all(recording.seatId)).some(
        (op) => op.kind === "recording" && op.sessionId === recording.sessionId,
      )
    )
      return;
  } catch {
    /* IndexedDB for takes unavailable: fall through to the copy in memory */
  }
  await outbox.add({ kind: "recording", ...recording });
}
