// Group commit for stroke saves. Every phone at the bench posts its strokes as they are heard, so
// saves arrive many at a time; a save that finds the database idle is written at once, and saves
// that arrive while a batch is being written wait and go together into the next one. Nothing is
// held back on a timer, so a lone phone sees no added delay.
import type { Db } from "@/db/client";
import { saveStrokeBatch, type StrokeSave, type StrokeSaveOutcome, type StrokeSaveResult } from "./batch";

/** At most this many strokes go into one batch (PostgreSQL takes at most 65,535 values per statement; a stroke takes 10). */
export const MAX_BATCH_STROKES = 2000;

interface Waiting {
  save: StrokeSave;
  resolve(result: StrokeSaveResult): void;
  reject(error: unknown): void;
}

export class StrokeSaveQueue {
  private readonly waiting: Waiting[] = [];
  private running = 0;
  private scheduled = false;

  constructor(
    private readonly write: (batch: StrokeSave[]) => Promise<StrokeSaveOutcome[]>,
    /** Batches written at the same time. */
    private readonly concurrency = 1,
    private readonly maxStrokes = MAX_BATCH_STROKES,
  ) {}

  submit(save: StrokeSave): Promise<StrokeSaveResult> {
    return new Promise<StrokeSaveResult>((resolve, reject) => {
      this.waiting.push({ save, resolve, reject });
      // Not at once: the requests that arrived together are still being read; they join when
      // this turn of the event loop has handled its input.
      if (!this.scheduled) {
        this.scheduled = true;
        setImmediate(() => {
          this.scheduled = false;
          this.pump();
        });
      }
    });
  }

  private pump(): void {
    while (this.running < this.concurrency && this.waiting.length > 0) {
      let strokeCount = this.waiting[0]!.save.strokes.length;
      let take = 1;
      while (take < this.waiting.length && strokeCount + this.waiting[take]!.save.strokes.length <= this.maxStrokes) {
        strokeCount += this.waiting[take]!.save.strokes.length;
        take++;
      }
      const batch = this.waiting.splice(0, take);
      this.running++;
      this.write(batch.map((w) => w.save))
        .then(
          (outcomes) => outcomes.forEach((o, i) => (o.ok ? batch[i]!.resolve(o.result) : batch[i]!.reject(o.error))),
          (err: unknown) => batch.forEach((w) => w.reject(err)),
        )
        .finally(() => {
          this.running--;
          this.pump();
        });
    }
  }
}

const queues = new WeakMap<Db, StrokeSaveQueue>();

/**
 * The queue for a database. One batch at a time: the embedded database runs one transaction at a
 * time anyway, and on a server one batch of many saves costs about what one save did. (Should the
 * framework load this module twice, each copy has its own queue; batches from the two still lock
 * their seats in one order, so the outcome is the same.)
 */
export function strokeQueueFor(db: Db): StrokeSaveQueue {
  let queue = queues.get(db);
  if (!queue) {
    queue = new StrokeSaveQueue((batch) => saveStrokeBatch(db, batch));
    queues.set(db, queue);
  }
  return queue;
}
