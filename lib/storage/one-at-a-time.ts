// Work on one key at a time within this process: the chunks of one session's recording arrive as
// separate requests, and two phones (or a phone and its own retry) may send the same chunk at
// once; each reads the upload's manifest, adds to it and writes it back, which must not interleave.
type GlobalWithQueues = typeof globalThis & { __grindfadeKeyQueues?: Map<string, Promise<unknown>> };

/** Runs `work` after every earlier work on the same key has settled. */
export function oneAtATime<T>(key: string, work: () => Promise<T>): Promise<T> {
  const g = globalThis as GlobalWithQueues;
  const queues = (g.__grindfadeKeyQueues ??= new Map());
  const before = queues.get(key) ?? Promise.resolve();
  const run = before.then(work, work);
  const settled = run.then(
    () => {},
    () => {},
  );
  queues.set(key, settled);
  void settled.then(() => {
    if (queues.get(key) === settled) queues.delete(key);
  });
  return run;
}
