// The phone's outbox: every session start, stroke, session end and recording is written to
// IndexedDB first and sent from there, so a dropped network or a reload loses nothing. Sends
// are idempotent on the server (client-made ids), so sending twice is harmless.
import { openDB, type DBSchema, type IDBPDatabase } from "idb";
import { UploadRefusedError, uploadInChunks } from "@/lib/storage/chunked-upload";
import type { StartSessionInput, StrokeInput } from "@/lib/validations/bench";

export type OutboxOp =
  | { kind: "session"; seatId: string; body: StartSessionInput }
  | { kind: "stroke"; seatId: string; sessionId: string; stroke: StrokeInput }
  | { kind: "end"; seatId: string; sessionId: string }
  | { kind: "recording"; seatId: string; sessionId: string; type: string; blob: Blob };

/**
 * `failed`: refused by the server (a 4xx), kept with its reason and never sent again.
 * `setAside`: the server failed on it (a 500) SERVER_FAILURE_TRIES times; kept on the phone with
 * the last answer and not sent again until someone asks (retrySetAside), so the ops behind it go on.
 * `serverFailures`/`retryAt`: the 500s so far and when it may be tried again (back-off).
 */
export type StoredOp = OutboxOp & { seq: number; failed?: string; setAside?: string; serverFailures?: number; retryAt?: number };

/** 500s in a row for one op before it is set aside. */
export const SERVER_FAILURE_TRIES = 5;

/** Wait before try n + 1 after n server failures: 2, 4, 8, 16 s. */
export const serverRetryDelayMs = (failures: number) => Math.min(30_000, 1000 * 2 ** failures);

export interface PendingStroke {
  sessionId: string;
  stroke: StrokeInput;
  stage?: StartSessionInput["stage"];
}

interface OutboxSchema extends DBSchema {
  ops: { key: number; value: StoredOp; indexes: { bySeat: string } };
}

export type SendResult =
  | { kind: "sent"; body?: unknown }
  | { kind: "retry"; reason: string; status?: number; message?: string }
  | { kind: "refused"; status: number; message: string }
  | { kind: "signed-out" };

/** Strokes the server confirmed in a flush, with its answer (lib/strokes: accepted, duplicates, seatState, verdict, strokeCount). */
export interface SavedStrokes {
  seatId: string;
  sessionId: string;
  strokes: StrokeInput[];
  answer: unknown;
}

export interface FlushReport {
  sent: number;
  /** Stroke saves the server confirmed, in the order they were sent. */
  saved: SavedStrokes[];
  /** Other things sent (session starts and ends, recordings): the seat's copy must be read again. */
  otherSent: number;
  pending: number;
  refused: Array<{ op: StoredOp; message: string }>;
  /** Set aside in this run after the server failed on them too often. */
  setAside: Array<{ op: StoredOp; message: string }>;
  stoppedBy: "done" | "offline" | "signed-out" | "server";
  lastBody?: unknown;
}

type Fetch = (input: string, init?: RequestInit) => Promise<Response>;

/** How far a recording's upload has gone; `done` once the server has it whole, `stopped` when it paused or was refused. */
export interface UploadProgress {
  sessionId: string;
  seatId: string;
  received: number;
  total: number;
  state: "sending" | "done" | "stopped";
}

/** Bytes per chunk of a recording's upload: small enough that progress moves on a phone's connection. */
export const RECORDING_CHUNK_BYTES = 256 * 1024;

async function send(fetchFn: Fetch, url: string, init: RequestInit): Promise<SendResult> {
  let res: Response;
  try {
    res = await fetchFn(url, init);
  } catch (err) {
    return { kind: "retry", reason: err instanceof Error ? err.message : "network" };
  }
  const body = (await res.json().catch(() => null)) as { message?: string } | null;
  if (res.ok) return { kind: "sent", body };
  if (res.status === 401) return { kind: "signed-out" };
  if (res.status >= 500 || res.status === 408 || res.status === 429) {
    return { kind: "retry", reason: `HTTP ${res.status}`, status: res.status, message: body?.message };
  }
  return { kind: "refused", status: res.status, message: body?.message ?? `Refused (HTTP ${res.status}).` };
}

/**
 * Recordings go up in chunks that resume where the server stopped, so a dropped connection
 * halfway through a long session resends only the rest. The outbox's own later runs are the
 * long retry, so the uploader retries only briefly here.
 */
async function sendRecording(
  fetchFn: Fetch,
  sessionId: string,
  blob: Blob,
  onProgress: (received: number, total: number) => void = () => {},
): Promise<SendResult> {
  try {
    await uploadInChunks(`/api/sessions/${sessionId}/recording/chunks`, blob, {
      fetchFn: fetchFn as typeof fetch,
      maxRetries: 2,
      retryDelayMs: () => 250,
      chunkBytes: RECORDING_CHUNK_BYTES,
      onProgress,
    });
    return { kind: "sent" };
  } catch (err) {
    if (err instanceof UploadRefusedError) {
      return err.status === 401 ? { kind: "signed-out" } : { kind: "refused", status: err.status, message: err.message };
    }
    return { kind: "retry", reason: err instanceof Error ? err.message : "network" };
  }
}

export class Outbox {
  private dbp: Promise<IDBPDatabase<OutboxSchema>>;
  private flushing: Promise<FlushReport> | null = null;
  private rerun = false;
  private readonly uploadListeners = new Set<(p: UploadProgress) => void>();

  constructor(
    name = "grindfade-outbox",
    private readonly fetchFn: Fetch = (i, init) => fetch(i, init),
  ) {
    this.dbp = openDB<OutboxSchema>(name, 1, {
      upgrade(db) {
        const store = db.createObjectStore("ops", { keyPath: "seq", autoIncrement: true });
        store.createIndex("bySeat", "seatId");
      },
    });
  }

  /** Calls `listener` as recordings go up; returns the function that stops it. */
  onUploadProgress(listener: (p: UploadProgress) => void): () => void {
    this.uploadListeners.add(listener);
    return () => this.uploadListeners.delete(listener);
  }

  private reportUpload(p: UploadProgress): void {
    for (const l of this.uploadListeners) {
      try {
        l(p);
      } catch {
        /* a listener's failure is not the upload's */
      }
    }
  }

  async add(op: OutboxOp): Promise<void> {
    const db = await this.dbp;
    await db.add("ops", op as StoredOp);
  }

  async all(seatId?: string): Promise<StoredOp[]> {
    const db = await this.dbp;
    return seatId ? db.getAllFromIndex("ops", "bySeat", seatId) : db.getAll("ops");
  }

  /**
   * A seat's strokes still waiting here. A stroke whose session is itself still waiting (begun
   * offline) carries that session's stage, which the server cannot tell yet.
   */
  async pendingStrokes(seatId: string): Promise<PendingStroke[]> {
    const ops = await this.all(seatId);
    const stages = new Map(ops.flatMap((op) => (op.kind === "session" ? [[op.body.sessionId, op.body.stage] as const] : [])));
    return ops.flatMap((op) => {
      if (op.kind !== "stroke") return [];
      const stage = stages.get(op.sessionId);
      return [stage ? { sessionId: op.sessionId, stroke: op.stroke, stage } : { sessionId: op.sessionId, stroke: op.stroke }];
    });
  }

  async count(): Promise<number> {
    return (await this.dbp).count("ops");
  }

  async clearFailed(): Promise<void> {
    const db = await this.dbp;
    for (const op of await db.getAll("ops")) if (op.failed) await db.delete("ops", op.seq);
  }

  /** What is set aside (for a seat, or all): kept here, waiting for someone to send it again. */
  async setAsideOps(seatId?: string): Promise<StoredOp[]> {
    return (await this.all(seatId)).filter((op) => op.setAside !== undefined);
  }

  /** Puts what was set aside back in line, with its count of failures cleared. */
  async retrySetAside(seatId?: string): Promise<void> {
    const db = await this.dbp;
    for (const op of await this.setAsideOps(seatId)) {
      const { setAside: _gone, serverFailures: _n, retryAt: _at, ...again } = op;
      await db.put("ops", again as StoredOp);
    }
  }

  /** Sends everything in order; concurrent calls share one run. */
  flush(): Promise<FlushReport> {
    if (this.flushing) {
      // Something was added while a run is going: one more pass picks it up at once, rather
      // than at the next timer tick.
      this.rerun = true;
      return this.flushing;
    }
    this.flushing = (async () => {
      let total: FlushReport | null = null;
      do {
        this.rerun = false;
        const pass = await this.run();
        total = total
          ? {
              ...pass,
              sent: total.sent + pass.sent,
              saved: [...total.saved, ...pass.saved],
              otherSent: total.otherSent + pass.otherSent,
              refused: [...total.refused, ...pass.refused],
              setAside: [...total.setAside, ...pass.setAside],
              lastBody: pass.lastBody ?? total.lastBody,
            }
          : pass;
      } while (this.rerun && total.stoppedBy === "done");
      return total;
    })().finally(() => {
      this.flushing = null;
    });
    return this.flushing;
  }

  private async run(): Promise<FlushReport> {
    const db = await this.dbp;
    const stored = await db.getAll("ops");
    const ops = stored.filter((o) => !o.failed && o.setAside === undefined);
    const report: FlushReport = { sent: 0, saved: [], otherSent: 0, pending: 0, refused: [], setAside: [], stoppedBy: "done" };
    // A session refused by the server refuses everything recorded in it, in this flush or a
    // later one: its strokes, end and recording are kept, marked with the refusal, not sent.
    const blockedSessions = new Map<string, string>();
    for (const o of stored) if (o.kind === "session" && o.failed) blockedSessions.set(o.body.sessionId, o.failed);
    // A session set aside (not yet on the server) sets aside what was recorded in it, likewise.
    const setAsideSessions = new Map<string, string>();
    for (const o of stored) if (o.kind === "session" && o.setAside !== undefined) setAsideSessions.set(o.body.sessionId, o.setAside);
    // After a batch is refused as malformed, its strokes go one by one so only the bad one is kept back.
    let singlyUntil = -1;
    // Sessions with a stroke backing off after a server failure; and whether anything backs off.
    const waitingSessions = new Set<string>();
    let backingOff = false;
    let i = 0;
    while (i < ops.length) {
      const op = ops[i]!;
      let batch: StoredOp[] = [op];
      let result: SendResult;
      const json = { "content-type": "application/json" };
      const blockedBy = op.kind === "session" ? undefined : blockedSessions.get(op.sessionId);
      if (blockedBy !== undefined) {
        await db.put("ops", { ...op, failed: blockedBy });
        i++;
        continue;
      }
      const asideBy = op.kind === "session" ? undefined : setAsideSessions.get(op.sessionId);
      if (asideBy !== undefined) {
        await db.put("ops", { ...op, setAside: asideBy });
        report.setAside.push({ op, message: asideBy });
        i++;
        continue;
      }
      // Backing off after a server failure on this op. A stroke waits alone: the strokes behind
      // it go on (each is saved by its own clientId, so order does not matter to the server),
      // while its session's end and recording wait for it. Anything else waits with the queue.
      if (op.retryAt !== undefined && op.retryAt > Date.now()) {
        backingOff = true;
        if (op.kind === "stroke") {
          waitingSessions.add(op.sessionId);
          i++;
          continue;
        }
        break;
      }
      if (op.kind !== "session" && op.kind !== "stroke" && waitingSessions.has(op.sessionId)) {
        i++;
        continue;
      }
      if (op.kind === "session") {
        result = await send(this.fetchFn, `/api/seats/${op.seatId}/sessions`, { method: "POST", headers: json, body: JSON.stringify(op.body) });
      } else if (op.kind === "stroke") {
        batch = [];
        // One at a time after a refusal or failure of a batch, and for a stroke the server failed on before.
        const limit = i < singlyUntil || op.serverFailures ? 1 : 200;
        for (let j = i; j < ops.length && batch.length < limit; j++) {
          const o = ops[j]!;
          if (o.kind !== "stroke" || o.sessionId !== op.sessionId) break;
          if (j > i && o.serverFailures) break;
          batch.push(o);
        }
        const strokes = batch.map((o) => (o as Extract<StoredOp, { kind: "stroke" }>).stroke);
        result = await send(this.fetchFn, `/api/sessions/${op.sessionId}/strokes`, { method: "POST", headers: json, body: JSON.stringify({ strokes }) });
      } else if (op.kind === "end") {
        result = await send(this.fetchFn, `/api/sessions/${op.sessionId}/end`, { method: "POST" });
      } else {
        const { sessionId, seatId } = op;
        const total = op.blob.size;
        let received = 0;
        result = await sendRecording(this.fetchFn, sessionId, op.blob, (r, t) => {
          received = r;
          this.reportUpload({ sessionId, seatId, received: r, total: t, state: "sending" });
        });
        this.reportUpload({
          sessionId,
          seatId,
          received: result.kind === "sent" ? total : received,
          total,
          state: result.kind === "sent" ? "done" : "stopped",
        });
      }
      if (result.kind === "sent") {
        const tx = db.transaction("ops", "readwrite");
        await Promise.all([...batch.map((b) => tx.store.delete(b.seq)), tx.done]);
        report.sent += batch.length;
        report.lastBody = result.body;
        if (op.kind === "stroke") {
          report.saved.push({ seatId: op.seatId, sessionId: op.sessionId, strokes: batch.map((b) => (b as Extract<StoredOp, { kind: "stroke" }>).stroke), answer: result.body });
        } else report.otherSent += 1;
      } else if (result.kind === "refused") {
        if (op.kind === "stroke" && result.status === 400 && batch.length > 1) {
          singlyUntil = i + batch.length;
          continue;
        }
        for (const b of batch) await db.put("ops", { ...b, failed: result.message });
        report.refused.push({ op, message: result.message });
        if (op.kind === "session") blockedSessions.set(op.body.sessionId, result.message);
      } else if (result.kind === "retry" && result.status === 500) {
        // The server failed on this (a 503 or a proxy's 502/504 is the server away, waited out
        // without counting). A batch is split first, so that only the stroke it fails on waits.
        if (op.kind === "stroke" && batch.length > 1) {
          singlyUntil = i + batch.length;
          continue;
        }
        const failures = (op.serverFailures ?? 0) + 1;
        const message = result.message ?? "the server failed on it";
        if (failures >= SERVER_FAILURE_TRIES) {
          await db.put("ops", { ...op, serverFailures: failures, setAside: message, retryAt: undefined });
          report.setAside.push({ op, message });
          if (op.kind === "session") setAsideSessions.set(op.body.sessionId, message);
          i += 1;
          continue;
        }
        await db.put("ops", { ...op, serverFailures: failures, retryAt: Date.now() + serverRetryDelayMs(failures) });
        backingOff = true;
        if (op.kind === "stroke") {
          waitingSessions.add(op.sessionId);
          i += 1;
          continue;
        }
        break;
      } else {
        report.stoppedBy = result.kind === "signed-out" ? "signed-out" : result.reason.startsWith("HTTP") ? "server" : "offline";
        break;
      }
      i += batch.length;
    }
    if (backingOff && report.stoppedBy === "done") report.stoppedBy = "server";
    report.pending = (await db.getAll("ops")).filter((o) => !o.failed && o.setAside === undefined).length;
    return report;
  }
}
