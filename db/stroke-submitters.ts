// Who takes a stroke save for an open database, when it is not the app's own queue: the database
// thread (db/pglite-thread.ts) keeps the save queue beside the PGlite it runs, so that a batch
// starts the moment the one before it ends. On globalThis, as the database itself is
// (db/client.ts): Next bundles these modules more than once.
import type { StrokeSave, StrokeSaveResult } from "@/lib/bench/stroke-batch";

export type StrokeSubmitter = (save: StrokeSave) => Promise<StrokeSaveResult>;

type GlobalWithSubmitters = typeof globalThis & { __grindfadeStrokeSubmitters?: WeakMap<object, StrokeSubmitter> };

function submitters(): WeakMap<object, StrokeSubmitter> {
  const g = globalThis as GlobalWithSubmitters;
  return (g.__grindfadeStrokeSubmitters ??= new WeakMap());
}

export function registerStrokeSubmitter(db: object, submit: StrokeSubmitter): void {
  submitters().set(db, submit);
}

/** The submitter registered for this database, or undefined: then the app's own queue writes the saves. */
export function strokeSubmitterFor(db: object): StrokeSubmitter | undefined {
  return submitters().get(db);
}
