// PGlite on a thread of its own (db/pglite-thread.ts), as the production server runs it, must be
// indistinguishable from PGlite on the app's thread: both are reached with node-postgres over
// their socket (db/pglite-socket.ts), and give the same rows and fields, the same errors with
// PostgreSQL's own codes, the same transactions, the same order, and a clean close. Each check
// runs the same thing on both and compares.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import { pgTable, text, uuid } from "drizzle-orm/pg-core";
import { customers, shops } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import { openDatabase } from "@/db/client";
import { ConflictError } from "@/lib/errors";
import { builtThreadScript, freshPglite, type TestDatabase } from "../helpers/db";

let here: TestDatabase;
let there: TestDatabase;

beforeAll(async () => {
  [here, there] = await Promise.all([freshPglite(), freshPglite({ thread: true })]);
  for (const t of [here, there]) {
    await seedDemoShop(t.db);
    await t.db.execute(sql`create table probe (id int primary key, label text not null unique, at timestamptz, amount numeric(8,3), tags text[], data jsonb, raw bytea, big int8, day date, span interval)`);
  }
});
afterAll(async () => {
  await Promise.all([here?.cleanup(), there?.cleanup()]);
});

const probe = pgTable("probe", { id: uuid("id"), label: text("label") });

type Rows = { rows: Array<Record<string, unknown>>; fields?: unknown };
const run = async (t: TestDatabase, statement: ReturnType<typeof sql>) => (await t.db.execute(statement)) as unknown as Rows;

async function onBoth<T>(work: (t: TestDatabase) => Promise<T>): Promise<[T, T]> {
  return [await work(here), await work(there)];
}

describe("PGlite on a thread of its own", () => {
  it("says where it runs", () => {
    expect(here.onThread).toBeFalsy();
    expect(there.onThread).toBe(true);
  });

  it("gives the same rows and fields for every kind of value the schema uses", async () => {
    const [a, b] = await onBoth(async (t) => {
      await t.db.execute(sql`insert into probe values
        (1, 'one', '2026-12-02 08:15:00.123+00', 12.345, '{coarse,fine}', '{"k": [1, 2, {"x": null}]}', '\\x00ff10', 9007199254740993, '2026-12-02', '1 day 02:03:04'),
        (2, 'two', null, null, '{}', 'null', null, -1, null, null)`);
      const raw = await run(t, sql`select * from probe order by id`);
      // Ids are drawn at random by each seed; everything else is the same.
      const viaDrizzle = await t.db.select({ name: shops.name, createdAt: shops.createdAt }).from(shops).then((rows) => rows.map((r) => ({ name: r.name, isDate: r.createdAt instanceof Date })));
      const typed = await run(t, sql`select now() - now() as zero, 1.5::real as r, true as yes, 'ü€𝄞'::text as u, array[1.25, 2.5]::numeric[] as nums`);
      return { raw: { rows: raw.rows, fields: raw.fields }, viaDrizzle, typed: typed.rows };
    });
    expect(b).toEqual(a);
    // Nothing came back empty: the comparison is of real values.
    expect(a.raw.rows).toHaveLength(2);
    expect(a.viaDrizzle.length).toBeGreaterThan(0);
  });

  it("refuses bad statements with PostgreSQL's own code, detail and constraint, as drizzle reports them", async () => {
    const fail = async (t: TestDatabase, statement: ReturnType<typeof sql>) => {
      try {
        await t.db.execute(statement);
      } catch (err) {
        const e = err as Error & { cause?: Record<string, unknown> };
        const c = e.cause ?? {};
        return { message: e.message, cause: { message: c.message, code: c.code, detail: c.detail, constraint: c.constraint, table: c.table, severity: c.severity } };
      }
      throw new Error("the statement was accepted");
    };
    for (const statement of [
      sql`insert into probe (id, label) values (100, 'one')`,
      sql`insert into probe (id, label) values (101, null)`,
      sql`select 1 / 0`,
      sql`select * from no_such_table`,
      sql`selec 1`,
    ]) {
      const [a, b] = await onBoth((t) => fail(t, statement));
      expect(b).toEqual(a);
      expect(a.cause.code).toMatch(/^[0-9A-Z]{5}$/);
    }
    const [unique] = await onBoth((t) => fail(t, sql`insert into probe (id, label) values (102, 'one')`));
    expect(unique.cause).toMatchObject({ code: "23505", constraint: "probe_label_key" });
  });

  it("commits a transaction, and rolls back one that throws, with a savepoint inside kept or undone", async () => {
    const [a, b] = await onBoth(async (t) => {
      await t.db.transaction(async (tx) => {
        await tx.execute(sql`insert into probe (id, label) values (10, 'kept')`);
        await tx
          .transaction(async (inner) => {
            await inner.execute(sql`insert into probe (id, label) values (11, 'undone by its savepoint')`);
            throw new Error("inner");
          })
          .catch(() => {});
        await tx.transaction(async (inner) => {
          await inner.execute(sql`insert into probe (id, label) values (12, 'kept by its savepoint')`);
        });
      });
      const thrown = await t.db
        .transaction(async (tx) => {
          await tx.execute(sql`insert into probe (id, label) values (13, 'rolled back')`);
          throw new ConflictError("changed my mind");
        })
        .catch((err: unknown) => err);
      // drizzle's own rollback, from inside.
      await t.db
        .transaction(async (tx) => {
          await tx.execute(sql`insert into probe (id, label) values (14, 'rolled back by tx.rollback')`);
          tx.rollback();
        })
        .catch(() => {});
      // A statement that fails inside aborts the transaction; the next one can run.
      await t.db.transaction(async (tx) => tx.execute(sql`select 1 / 0`)).catch(() => {});
      const rows = await run(t, sql`select id, label from probe where id between 10 and 19 order by id`);
      return { rows: rows.rows, thrown: thrown instanceof ConflictError ? thrown.message : String(thrown) };
    });
    expect(b).toEqual(a);
    expect(a.rows).toEqual([
      { id: 10, label: "kept" },
      { id: 12, label: "kept by its savepoint" },
    ]);
    expect(a.thrown).toBe("changed my mind");
  });

  it("runs a statement sent while a transaction is open after that transaction, as PGlite does in-process", async () => {
    const [a, b] = await onBoth(async (t) => {
      const order: string[] = [];
      let inside!: () => void;
      const opened = new Promise<void>((r) => (inside = r));
      const tx = t.db.transaction(async (tx) => {
        await tx.execute(sql`insert into probe (id, label) values (20, 'written in the transaction')`);
        inside();
        await new Promise((r) => setTimeout(r, 50));
        order.push("transaction done");
      });
      await opened;
      const outside = run(t, sql`select count(*)::int as n from probe where id = 20`).then((r) => {
        order.push("outside read");
        return r.rows[0];
      });
      await tx;
      return { seen: await outside, order };
    });
    expect(b).toEqual(a);
    expect(a).toEqual({ seen: { n: 1 }, order: ["transaction done", "outside read"] });
  });

  it("keeps many statements in flight at once apart, each answered with its own rows", async () => {
    const [a, b] = await onBoth((t) => Promise.all(Array.from({ length: 200 }, (_, i) => run(t, sql`select ${i}::int * 2 as v`).then((r) => r.rows[0]))));
    expect(b).toEqual(a);
    expect(a.map((r) => (r as { v: number }).v)).toEqual(Array.from({ length: 200 }, (_, i) => i * 2));
  });

  it("reads the same through drizzle's query builder, joins and all", async () => {
    const [a, b] = await onBoth((t) =>
      t.db
        .select({ shop: shops.name, customer: customers.name })
        .from(customers)
        .innerJoin(shops, eq(shops.id, customers.shopId))
        .orderBy(customers.name),
    );
    expect(b).toEqual(a);
    // An unknown table in the builder fails alike.
    const [x, y] = await onBoth((t) => t.db.select().from(probe).then(() => "ran", (e: Error & { cause?: { code?: string } }) => e.cause?.code));
    expect(y).toEqual(x);
  });
});

describe("the database thread's boundary", () => {
  it("closes the database cleanly, so that it opens again on the app's thread with everything in it", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-remote-"));
    const pgliteDir = path.join(dir, "pglite");
    try {
      const first = await openDatabase({ pgliteDir, pglite: { thread: { script: await builtThreadScript() } } });
      await first.db.execute(sql`create table kept (v text)`);
      await first.db.execute(sql`insert into kept values ('still here')`);
      await first.close();
      expect(first.busy()).toBe(false);
      // After the close, statements are refused, not left hanging.
      await expect(first.db.execute(sql`select 1`)).rejects.toThrow();
      const again = await openDatabase({ pgliteDir });
      expect((await run({ ...again, cleanup: async () => {} }, sql`select v from kept`)).rows).toEqual([{ v: "still here" }]);
      await again.close();
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("fails the statements waiting on a thread that stops, and every one after", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-remote-"));
    try {
      let worker!: { terminate(): Promise<number> };
      const stops: string[] = [];
      const handle = await openDatabase({
        pgliteDir: path.join(dir, "pglite"),
        pglite: { thread: { script: await builtThreadScript(), onStarted: (w) => (worker = w), onUnexpectedStop: (err) => void stops.push(err.message) } },
      });
      const waiting = handle.db.execute(sql`select pg_sleep(0.5)`);
      await worker.terminate();
      await expect(waiting).rejects.toThrow();
      await expect(handle.db.execute(sql`select 1`)).rejects.toThrow();
      await handle.close().catch(() => {});
      expect(stops).toHaveLength(1);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("tells the server once when its database thread dies, and not when it is closed", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-remote-"));
    try {
      const script = await builtThreadScript();
      const stops: string[] = [];
      const onUnexpectedStop = (err: Error) => void stops.push(err.message);
      let worker!: { terminate(): Promise<number> };
      const dying = await openDatabase({ pgliteDir: path.join(dir, "a"), pglite: { thread: { script, onUnexpectedStop, onStarted: (w) => (worker = w) } } });
      await worker.terminate();
      await expect(dying.db.execute(sql`select 1`)).rejects.toThrow();
      await dying.close().catch(() => {});
      expect(stops).toEqual([expect.stringMatching(/^The database thread stopped \(exit code \d+\)\.$/)]);
      const closing = await openDatabase({ pgliteDir: path.join(dir, "b"), pglite: { thread: { script, onUnexpectedStop } } });
      await closing.close();
      expect(stops).toHaveLength(1);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("refuses a data directory it cannot open, with the reason", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "grindfade-remote-"));
    const pgliteDir = path.join(dir, "pglite");
    try {
      const holder = await openDatabase({ pgliteDir });
      await holder.close();
      // A damaged cluster: its control file is gone.
      fs.rmSync(path.join(pgliteDir, "global", "pg_control"));
      await expect(openDatabase({ pgliteDir, pglite: { thread: { script: await builtThreadScript() } } })).rejects.toThrow(/could not be opened/);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
