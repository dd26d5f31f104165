// The stroke save's statements are PREPAREd on PGlite and EXECUTEd with their values written into
// the statement's text (lib/bench/statements.ts). The reference for every value is PGlite's own
// parameter binding: the same value bound as a parameter and written as a literal must arrive as
// the same thing, for the awkward cases too (quotes, backslashes, braces, commas, NULLs in arrays,
// non-ASCII text, tiny and huge numbers).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "drizzle-orm";
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { customers, jobs, lappingSessions, shops, users } from "@/db/schema";
import { DEMO_USERS, seedDemoShop } from "@/db/seed";
import { saveStrokeBatch } from "@/lib/bench/stroke-batch";
import { FixedStatement, literal, PLANNER_SETTINGS, Statements, statementsFor } from "@/lib/bench/statements";
import { createHeadWithSeats } from "@/lib/heads/create";
import { DEFAULT_HEAD_LAYOUT } from "@/lib/heads/layout";
import { freshPglite, freshServerDatabase, serverUrl, type TestDatabase } from "../helpers/db";
import { syntheticStroke } from "../helpers/strokes";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshPglite();
});
afterAll(async () => {
  await t?.cleanup();
});

type Rows = { rows: Array<Record<string, unknown>> };
const rows = async (statement: ReturnType<typeof sql>) => ((await t.db.execute(statement)) as unknown as Rows).rows;

describe("a value written as a literal", () => {
  const texts = ["", "plain", "it's", "''", "back\\slash", 'a "quoted" word', "{braces}", "a,b", "NULL", "null", "ü€𝄞", " lead and trail ", "new\nline", "tab\there"];
  const numbers = [0, -0, 1.5, -273.15, 1e-7, 6.02e23, 2 ** 53 - 1, 0.1 + 0.2, 12.345678];
  const uuids = ["00000000-0000-0000-0000-000000000000", "5b3f0c5e-8d9a-4c1e-9f6b-2a7d4e8c1b90"];

  it("arrives as the same text, number or uuid as PGlite's own binding of it", async () => {
    for (const [cast, values] of [
      ["text", texts],
      ["float8", numbers],
      ["real", numbers],
      ["int4", [0, -1, 2147483647]],
      ["uuid", uuids],
      ["bool", [true, false]],
    ] as const) {
      for (const v of values as readonly unknown[]) {
        const bound = await rows(sql`select ${v}::${sql.raw(cast)} as v`);
        const written = await rows(sql.raw(`select ${literal(v)}::${cast} as v`));
        expect(written, `${cast} ${JSON.stringify(v)}`).toEqual(bound);
      }
    }
  });

  it("arrives as the same array, elements and NULLs included", async () => {
    const cases: Array<[string, unknown[]]> = [
      ["text[]", texts],
      ["text[]", []],
      ["text[]", ["a", null, "b"]],
      ["real[]", numbers],
      ["int4[]", [1, 2, 3]],
      ["uuid[]", uuids],
    ];
    for (const [cast, values] of cases) {
      const bound = await rows(sql`select ${sql.param(values)}::${sql.raw(cast)} as v`);
      const written = await rows(sql.raw(`select ${literal(values)}::${cast} as v`));
      expect(written, `${cast} ${JSON.stringify(values)}`).toEqual(bound);
    }
  });

  it("is NULL for null, and refuses what it cannot write faithfully", () => {
    expect(literal(null)).toBe("NULL");
    expect(literal(undefined)).toBe("NULL");
    expect(() => literal(Number.NaN)).toThrow(/finite/);
    expect(() => literal(Number.POSITIVE_INFINITY)).toThrow(/finite/);
    expect(() => literal("nul\u0000inside")).toThrow(/NUL/);
    expect(() => literal({ an: "object" })).toThrow(/cannot be written/);
  });

  it("cannot end the literal early, whatever the text", async () => {
    const hostile = "x'); drop table users; --";
    expect(await rows(sql.raw(`select ${literal(hostile)}::text as v`))).toEqual([{ v: hostile }]);
    expect(await rows(sql.raw(`select ${literal([hostile, '"}'])}::text[] as v`))).toEqual([{ v: [hostile, '"}'] }]);
    expect(await rows(sql`select count(*)::int as n from users`)).toEqual([{ n: 0 }]);
  });
});

describe("prepared statements", () => {
  it("give the same rows as the statement run plainly, prepared once and reused", async () => {
    const statements = statementsFor(t.db);
    expect(statementsFor(t.db)).toBe(statements);
    const probe = new FixedStatement<"ids" | "label">(
      "probe_ids",
      (v) => sql`select id, ${v.label}::text as label from unnest(${v.ids}::uuid[]) with ordinality as u(id, n) order by n`,
    );
    for (const ids of [["5b3f0c5e-8d9a-4c1e-9f6b-2a7d4e8c1b90"], [], ["00000000-0000-0000-0000-000000000001", "00000000-0000-0000-0000-000000000002"]]) {
      const plain = await rows(sql`select id, ${"it's"}::text as label from unnest(${sql.param(ids)}::uuid[]) with ordinality as u(id, n) order by n`);
      const [viaPrepared] = await t.db.transaction(async (tx) => {
        statements.begin(tx as never);
        return statements.run(tx as never, [{ statement: probe, values: { ids, label: "it's" } }]);
      });
      expect(viaPrepared).toEqual(plain);
    }
    const named = await rows(sql`select count(*)::int as n from pg_prepared_statements where name like '%probe_ids'`);
    expect(named).toEqual([{ n: 1 }]);
  });

  it("outlive a transaction that rolls back, as PostgreSQL's prepared statements do", async () => {
    const statements = new Statements(true);
    const probe = new FixedStatement<"v">("probe_rollback", (v) => sql`select ${v.v}::int as v`);
    await t.db
      .transaction(async (tx) => {
        await statements.run(tx as never, [{ statement: probe, values: { v: 1 } }]);
        throw new Error("roll back");
      })
      .catch(() => {});
    const [again] = await t.db.transaction((tx) => statements.run(tx as never, [{ statement: probe, values: { v: 2 } }]));
    expect(again).toEqual([{ v: 2 }]);
  });

  it("refuse two statements of different texts under the same name", async () => {
    const statements = new Statements(true);
    const first = new FixedStatement<"v">("probe_fixed", (v) => sql`select ${v.v}::int[] as v`);
    const second = new FixedStatement<"v" | "w">("probe_fixed", (v) => sql`select ${v.v}::int as v, ${v.w}::int as w`);
    await statements.run(t.db, [{ statement: first, values: { v: [1, 2] } }]);
    await expect(statements.run(t.db, [{ statement: second, values: { v: 1, w: 2 } }])).rejects.toThrow(/different texts/);
  });

  it("answer nothing for a statement that returns no rows, and run it", async () => {
    const statements = new Statements(true);
    await t.db.execute(sql`create temporary table probe_nothing (v int)`);
    const insert = new FixedStatement<"v">("probe_nothing", (v) => sql`insert into probe_nothing values (${v.v}::int)`, "nothing");
    expect(await statements.run(t.db, [{ statement: insert, values: { v: 7 } }])).toEqual([[]]);
    expect(await rows(sql`select v from probe_nothing`)).toEqual([{ v: 7 }]);
  });
});

describe("the stroke save's plans on PGlite", () => {
  it("look rows up by index, never by scanning or hashing a table, even when planned on a nearly empty database", async () => {
    // PGlite runs no autovacuum, so nothing tells the planner that tables have grown; the plan
    // made at the first save is the one every later save runs. Made here on the demo shop with
    // one head more, it must still be index lookups (EXPLAIN of the cached generic plan, read
    // back through the prepared statement itself).
    const db = await freshPglite();
    try {
      await seedDemoShop(db.db);
      const [shop] = await db.db.select().from(shops).limit(1);
      const [customer] = await db.db.select().from(customers).limit(1);
      const ines = DEMO_USERS.find((u) => u.role === "technician")!;
      const [tech] = await db.db.select().from(users).where(eq(users.email, ines.email));
      const [job] = await db.db
        .insert(jobs)
        .values({ shopId: shop!.id, number: "PLAN-1", customerId: customer!.id, engineDescription: "Plan test head", status: "at_bench", assignedTechnicianId: tech!.id })
        .returning();
      const head = await createHeadWithSeats(db.db, job!.id, "Head", DEFAULT_HEAD_LAYOUT);
      const sessionIds: string[] = [];
      for (const seat of head.seats.slice(0, 3)) {
        const id = randomUUID();
        await db.db.insert(lappingSessions).values({ id, seatId: seat.id, technicianId: tech!.id, stage: "coarse", deviceId: "dev-plan-01" });
        sessionIds.push(id);
      }
      const outcomes = await saveStrokeBatch(
        db.db,
        sessionIds.map((sessionId, k) => ({ userId: tech!.id, sessionId, strokes: [syntheticStroke(1, 9 - k)] })),
      );
      expect(outcomes.every((o) => o.ok)).toBe(true);

      const client = (db.db as unknown as { $client: { exec(q: string): Promise<Array<{ rows: Array<Record<string, unknown>> }>> } }).$client;
      const [prepared] = await client.exec("select name, cardinality(parameter_types) as n from pg_prepared_statements where name like '%stroke_%' order by name");
      const keys = prepared!.rows.map((r) => String(r.name).replace(/^gf_[a-z0-9]+_/, ""));
      expect(keys).toEqual(expect.arrayContaining(["stroke_contexts", "stroke_curves", "stroke_insert", "stroke_people"]));
      for (const row of prepared!.rows) {
        const args = Array.from({ length: Number(row.n) }, () => "NULL").join(", ");
        const results = await client.exec(
          ["begin", PLANNER_SETTINGS, `explain execute ${String(row.name)}${args ? `(${args})` : ""}`, "rollback"].join(";\n"),
        );
        const plan = results[2]!.rows.map((r) => String(r["QUERY PLAN"])).join("\n");
        expect(plan, `${String(row.name)}:\n${plan}`).not.toMatch(/Seq Scan on (strokes|lapping_sessions|seats|heads|jobs|users|valves)\b|Hash Join|Merge Join/);
        // The insert reads no table; the others must find their rows by index.
        if (!plan.includes("Insert on strokes")) expect(plan, String(row.name)).toMatch(/Index (Only )?Scan/);
      }
    } finally {
      await db.cleanup();
    }
  });
});

const server = serverUrl();
describe.skipIf(!server)("on a PostgreSQL server", () => {
  it("runs the same statements unprepared", async () => {
    const pg = await freshServerDatabase(server!);
    try {
      const statements = statementsFor(pg.db);
      const probe = new FixedStatement<"v">("probe_server", (v) => sql`select ${v.v}::text as v`);
      const [result] = await statements.run(pg.db, [{ statement: probe, values: { v: "it's" } }]);
      expect(result).toEqual([{ v: "it's" }]);
      const named = (await pg.db.execute(sql`select count(*)::int as n from pg_prepared_statements`)) as unknown as Rows;
      expect(named.rows).toEqual([{ n: 0 }]);
    } finally {
      await pg.cleanup();
    }
  });
});
