// Who writes a batch of stroke saves for an open database, when it is not the app's own thread:
// the database thread (db/pglite-thread.ts) writes them beside the PGlite it runs. On
// globalThis, as the database itself is (db/client.ts): Next bundles these modules more than once.
import type { StrokeSave, StrokeSaveOutcome } from "@/lib/bench/stroke-batch";

export type StrokeWriter = (batch: StrokeSave[]) => Promise<StrokeSaveOutcome[]>;

type GlobalWithWriters = typeof globalThis & { __grindfadeStrokeWriters?: WeakMap<object, StrokeWriter> };

function writers(): WeakMap<object, StrokeWriter> {
  const g = globalThis as GlobalWithWriters;
  return (g.__grindfadeStrokeWriters ??= new WeakMap());
}

export function registerStrokeWriter(db: object, write: StrokeWriter): void {
  writers().set(db, write);
}

/** The writer registered for this database, or undefined: then the batch is written here. */
export function strokeWriterFor(db: object): StrokeWriter | undefined {
  return writers().get(db);
}
