// The app's side of the database thread (db/pglite-thread.ts): an object with the part of
// PGlite's interface that drizzle's PGlite driver and our own code use — query, exec,
// transaction, close — each call a message to the thread and its answer. PGlite on the thread
// still runs one statement or transaction at a time, in the order they arrive, as in-process.
import { Worker } from "node:worker_threads";
import type { StrokeSave, StrokeSaveResult } from "@/lib/bench/stroke-batch";
import { receiveError, type QueryRowMode, type SentError, type ThreadAnswer, type ThreadReady, type ThreadRequest } from "./pglite-thread-protocol";

type Parsers = Record<number, (text: string, typeId: number) => unknown>;

export interface RemoteQueryOptions {
  rowMode?: QueryRowMode;
  /** Only parsers that return the text as it is can cross to the thread (drizzle passes no other). */
  parsers?: Parsers;
}

export interface RemoteResults<T = Record<string, unknown>> {
  rows: T[];
  affectedRows?: number;
  fields: Array<{ name: string; dataTypeID: number }>;
}

type Request = ThreadRequest extends infer R ? (R extends { id: number } ? Omit<R, "id"> : never) : never;

const PROBE = "\u0000grindfade-probe";

/** What a transaction's callback gets: queries inside the transaction. */
export interface RemoteTransaction {
  query<T = Record<string, unknown>>(sql: string, params?: unknown[], options?: RemoteQueryOptions): Promise<RemoteResults<T>>;
  exec(sql: string): Promise<RemoteResults[]>;
  /** Ends the transaction without its changes, as PGlite's own rollback() does. */
  rollback(): Promise<void>;
  readonly closed: boolean;
}

class RollbackRequested extends Error {
  constructor() {
    super("Transaction rolled back.");
  }
}

export class RemotePglite {
  private nextId = 1;
  private readonly pending = new Map<number, { resolve(value: unknown): void; reject(err: unknown): void }>();
  private inFlight = 0;
  private stopped: Error | null = null;
  private readonly rawTypesOf = new WeakMap<Parsers, number[]>();
  /** Resolved once the thread has opened the database (PGlite's own name for it). */
  readonly waitReady: Promise<void>;

  /** PGlite's own name: the database is closed, or its thread has stopped. */
  get closed(): boolean {
    return this.stopped !== null;
  }

  private constructor(private readonly worker: Worker) {
    this.waitReady = new Promise<void>((resolve, reject) => {
      const onFirst = (m: ThreadReady) => {
        if (m.ready) resolve();
        else reject(receiveError(m.error));
        worker.on("message", (answer: ThreadAnswer) => this.settle(answer));
      };
      worker.once("message", onFirst);
      worker.once("error", reject);
    });
    worker.on("error", (err) => this.stop(err));
    worker.on("exit", (code) => this.stop(new Error(`The database thread stopped (exit code ${code}).`)));
  }

  /** Starts the thread (script: the built db/pglite-thread) on a PGlite data directory and waits until it is open. */
  static async open(dir: string, script: string | URL, options: { execArgv?: string[] } = {}): Promise<RemotePglite> {
    const worker = new Worker(script, { workerData: { dir }, execArgv: options.execArgv });
    const remote = new RemotePglite(worker);
    try {
      await remote.waitReady;
    } catch (err) {
      await worker.terminate();
      throw err;
    }
    return remote;
  }

  /** Called once if the thread stops other than by close(): the database is gone for this process. */
  onUnexpectedStop: ((err: Error) => void) | null = null;

  private stop(err: Error): void {
    if (!this.stopped && this.onUnexpectedStop) this.onUnexpectedStop(err);
    this.stopped ??= err;
    for (const p of this.pending.values()) p.reject(err);
    this.pending.clear();
  }

  private settle(answer: ThreadAnswer): void {
    const p = this.pending.get(answer.id);
    if (!p) return;
    this.pending.delete(answer.id);
    if (answer.ok) p.resolve(answer.value);
    else p.reject(receiveError(answer.error as SentError));
  }

  private async call<T>(request: Request): Promise<T> {
    if (this.stopped) throw this.stopped;
    const id = this.nextId++;
    this.inFlight++;
    try {
      return await new Promise<T>((resolve, reject) => {
        this.pending.set(id, { resolve: resolve as (v: unknown) => void, reject });
        this.worker.postMessage({ ...request, id });
      });
    } finally {
      this.inFlight--;
    }
  }

  private rawTypes(parsers: Parsers | undefined): number[] {
    if (!parsers) return [];
    let types = this.rawTypesOf.get(parsers);
    if (!types) {
      types = Object.keys(parsers).map(Number);
      for (const t of types) {
        if (parsers[t]!(PROBE, t) !== PROBE) throw new Error(`A parser for type ${t} cannot be sent to the database thread.`);
      }
      this.rawTypesOf.set(parsers, types);
    }
    return types;
  }

  private async queryIn<T>(tx: number | undefined, sql: string, params: unknown[] = [], options: RemoteQueryOptions = {}) {
    return this.call<RemoteResults<T>>({ op: "query", sql, params, rowMode: options.rowMode ?? "object", rawTypes: this.rawTypes(options.parsers), tx });
  }

  query<T = Record<string, unknown>>(sql: string, params?: unknown[], options?: RemoteQueryOptions): Promise<RemoteResults<T>> {
    return this.queryIn<T>(undefined, sql, params, options);
  }

  exec(sql: string): Promise<RemoteResults[]> {
    return this.call({ op: "exec", sql });
  }

  /** As PGlite's: commits when the callback returns, rolls back when it throws (and throws that again). */
  async transaction<T>(callback: (tx: RemoteTransaction) => Promise<T>): Promise<T> {
    const txId = await this.call<number>({ op: "begin" });
    let closed = false;
    const tx: RemoteTransaction = {
      query: (sql, params, options) => {
        if (closed) return Promise.reject(new Error("The transaction is closed."));
        return this.queryIn(txId, sql, params, options);
      },
      exec: (sql) => {
        if (closed) return Promise.reject(new Error("The transaction is closed."));
        return this.call({ op: "exec", sql, tx: txId });
      },
      rollback: () => Promise.reject(new RollbackRequested()),
      get closed() {
        return closed;
      },
    };
    let result: T;
    try {
      result = await callback(tx);
    } catch (err) {
      closed = true;
      await this.call({ op: "end", tx: txId, commit: false });
      if (err instanceof RollbackRequested) return undefined as T;
      throw err;
    }
    closed = true;
    await this.call({ op: "end", tx: txId, commit: true });
    return result;
  }

  /**
   * One stroke save, queued on the database thread: saves that arrive while a batch is written
   * there go together into the next one (lib/bench/stroke-batch.ts). A refusal comes back as the
   * error it was.
   */
  submitStrokes(save: StrokeSave): Promise<StrokeSaveResult> {
    return this.call<StrokeSaveResult>({ op: "strokes", save });
  }

  /** True while a request is on its way to the thread or waiting for its answer. */
  busy(): boolean {
    return this.inFlight > 0;
  }

  /** Closes the database as PGlite's close() does (a clean shutdown checkpoint), then ends the thread. */
  async close(): Promise<void> {
    if (this.stopped) return;
    await this.call({ op: "close" });
    // Set before the thread ends, so its exit is not taken for an unexpected stop.
    this.stopped = new Error("The database is closed.");
    await this.worker.terminate();
  }
}
