// The committed migrations on a fresh embedded database and on a real PostgreSQL server: the
// same tables, and the constraints actually refuse bad rows.
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { heads, jobs, seats, shops, customers, auditEntries, strokes, lappingSessions, users } from "@/db/schema";
import { freshPglite, freshServerDatabase, serverUrl, type TestDatabase } from "../helpers/db";

const EXPECTED_TABLES = [
  "audit_entries",
  "camshafts",
  "customer_links",
  "customers",
  "engine_specs",
  "heads",
  "job_spec_overrides",
  "jobs",
  "journals",
  "lapping_sessions",
  "mail_outbox",
  "measurements",
  "reviews",
  "seat_checks",
  "seat_photos",
  "seats",
  "shops",
  "spec_values",
  "strokes",
  "torque_sheets",
  "torque_ticks",
  "users",
  "valves",
];

/** Postgres error code of a failed query, wherever the driver put it. */
async function pgCode(p: Promise<unknown>): Promise<string | undefined> {
  try {
    await p;
  } catch (err) {
    const e = err as { code?: string; cause?: { code?: string } };
    return e.cause?.code ?? e.code;
  }
  return undefined;
}

const server = serverUrl();
const backends: Array<[string, () => Promise<TestDatabase>]> = [["PGlite", freshPglite]];
if (server) backends.push(["PostgreSQL server", () => freshServerDatabase(server)]);
else console.warn("TEST_DATABASE_URL not set: server-database migration tests skipped (CI runs them).");

describe.each(backends)("migrations on %s", (_name, open) => {
  let t: TestDatabase;
  beforeAll(async () => {
    t = await open();
  });
  afterAll(async () => {
    await t?.cleanup();
  });

  it("creates every table", async () => {
    const res = await t.db.execute<{ table_name: string }>(
      sql`select table_name from information_schema.tables where table_schema = 'public' order by table_name`,
    );
    const rows = (res as unknown as { rows: Array<{ table_name: string }> }).rows;
    expect(rows.map((r) => r.table_name)).toEqual(EXPECTED_TABLES);
  });

  it("enforces foreign keys, uniques and checks", async () => {
    const [shop] = await t.db.insert(shops).values({ name: "Test Bench Co" }).returning();
    const [customer] = await t.db.insert(customers).values({ shopId: shop!.id, name: "A. Customer" }).returning();
    const [job] = await t.db
      .insert(jobs)
      .values({ shopId: shop!.id, number: "T-1", customerId: customer!.id, engineDescription: "test engine" })
      .returning();
    const layout = {
      jobId: job!.id,
      label: "Head",
      arrangement: "inline" as const,
      cylinderCount: 4,
      intakeValvesPerCylinder: 2,
      exhaustValvesPerCylinder: 2,
      camshaftCount: 2,
      journalsPerCamshaft: 5,
    };
    const [head] = await t.db.insert(heads).values(layout).returning();

    // 23503 foreign key, 23505 unique, 23514 check (PostgreSQL error codes, appendix A of its manual).
    expect(
      await pgCode(
        t.db.insert(jobs).values({
          shopId: shop!.id,
          number: "T-2",
          customerId: "00000000-0000-0000-0000-000000000000",
          engineDescription: "x",
        }),
      ),
    ).toBe("23503");
    expect(
      await pgCode(
        t.db.insert(jobs).values({ shopId: shop!.id, number: "T-1", customerId: customer!.id, engineDescription: "x" }),
      ),
    ).toBe("23505");
    expect(await pgCode(t.db.insert(heads).values({ ...layout, label: "zero", cylinderCount: 0 }))).toBe("23514");
    expect(
      await pgCode(t.db.insert(heads).values({ ...layout, label: "odd V", arrangement: "v", cylinderCount: 5 })),
    ).toBe("23514");
    await t.db.insert(seats).values({ headId: head!.id, cylinder: 1, kind: "intake", position: 1 });
    expect(
      await pgCode(t.db.insert(seats).values({ headId: head!.id, cylinder: 1, kind: "intake", position: 1 })),
    ).toBe("23505");
    expect(
      await pgCode(
        t.db.execute(sql`insert into seats (head_id, cylinder, kind, position) values (${head!.id}, 1, 'sideways', 2)`),
      ),
    ).toBe("22P02"); // invalid input value for an enum
  });

  it("saves a stroke once per client id", async () => {
    const [shop] = await t.db.insert(shops).values({ name: "Stroke Shop" }).returning();
    const [user] = await t.db
      .insert(users)
      .values({ shopId: shop!.id, email: "t@stroke.example", name: "T", passwordHash: "x" })
      .returning();
    const [customer] = await t.db.insert(customers).values({ shopId: shop!.id, name: "C" }).returning();
    const [job] = await t.db
      .insert(jobs)
      .values({ shopId: shop!.id, number: "S-1", customerId: customer!.id, engineDescription: "e" })
      .returning();
    const [head] = await t.db
      .insert(heads)
      .values({
        jobId: job!.id,
        label: "H",
        cylinderCount: 1,
        intakeValvesPerCylinder: 1,
        exhaustValvesPerCylinder: 1,
        camshaftCount: 1,
        journalsPerCamshaft: 3,
      })
      .returning();
    const [seat] = await t.db.insert(seats).values({ headId: head!.id, cylinder: 1, kind: "exhaust", position: 1 }).returning();
    const [session] = await t.db
      .insert(lappingSessions)
      .values({ seatId: seat!.id, stage: "coarse", technicianId: user!.id, sampleRateHz: 44100 })
      .returning();
    const stroke = {
      sessionId: session!.id,
      clientId: "6f1c1b1e-8d43-4f5e-9a51-0c8c6c3a9b10",
      index: 1,
      startS: 1.5,
      endS: 2.4,
      onsetDb: -20,
      bodyDb: -31,
      contrastDb: 11,
    };
    await t.db.insert(strokes).values(stroke);
    const again = await t.db.insert(strokes).values(stroke).onConflictDoNothing().returning();
    expect(again).toHaveLength(0);
    expect(await pgCode(t.db.insert(strokes).values({ ...stroke, clientId: crypto.randomUUID(), endS: 1.0 }))).toBe("23514");
    expect(
      await pgCode(t.db.insert(lappingSessions).values({ seatId: seat!.id, stage: "coarse", technicianId: user!.id, sampleRateHz: 100 })),
    ).toBe("23514");
  });

  it("keeps the audit trail append-only", async () => {
    const [entry] = await t.db
      .insert(auditEntries)
      .values({ action: "test.created", entityType: "test", entityId: "1", after: { a: 1 } })
      .returning();
    expect(await pgCode(t.db.update(auditEntries).set({ action: "test.edited" }).where(sql`id = ${entry!.id}`))).toBe("42501");
    expect(await pgCode(t.db.delete(auditEntries).where(sql`id = ${entry!.id}`))).toBe("42501");
    expect(await pgCode(t.db.execute(sql`truncate audit_entries`))).toBe("42501");
    const res = await t.db.execute(sql`select action from audit_entries where id = ${entry!.id}`);
    expect((res as unknown as { rows: Array<{ action: string }> }).rows[0]?.action).toBe("test.created");
  });
});
