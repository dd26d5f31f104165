// A stroke's figures are stored in single-precision columns (real). Property-based cases at the
// edges of what those columns and their checks hold: whatever the schema accepts is stored as it
// was checked, on PGlite and on the PostgreSQL server, and whatever the database would refuse is
// refused at the door with a 400 naming the field, never a 500. Ids are taken in any letter case.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { strokes } from "@/db/schema";
import type { TestDatabase } from "../helpers/db";
import { freshPglite, freshServerDatabase, serverUrl } from "../helpers/db";
import { seedDemoShop } from "@/db/seed";
import { startSession, saveStrokes } from "@/lib/bench/service";
import { strokeInputSchema, type StrokeInput } from "@/lib/validations/bench";
import { actorOf } from "../sheets/helpers";
import { seatId } from "./helpers";

// IEEE 754 single precision (binary32): the largest finite value, the smallest normal and the
// smallest subnormal; beyond those a figure is infinite or underflows to zero.
const FLOAT32_MAX = 3.4028234663852886e38;
const FLOAT32_MIN_NORMAL = 1.1754943508222875e-38;
const FLOAT32_MIN_SUBNORMAL = 1.401298464324817e-45;

/** Doubles where single precision runs out: bounds of the columns' checks, one double past them, under- and overflow. */
const edgeNumber = (bounds: number[]) =>
  fc.oneof(
    fc.constantFrom(
      ...bounds.flatMap((b) => [b, b + b * Number.EPSILON, b - Math.abs(b) * Number.EPSILON, b + 1e-7, b - 1e-7, b + 1e-5]),
      0,
      -0,
      FLOAT32_MIN_SUBNORMAL,
      FLOAT32_MIN_SUBNORMAL / 3,
      FLOAT32_MIN_NORMAL,
      1e-46,
      -1e-46,
      1e-40,
      Number.MIN_VALUE,
      FLOAT32_MAX,
      FLOAT32_MAX * 1.0000001,
      1e39,
    ),
    fc.double({ noNaN: true, noDefaultInfinity: true, min: Math.min(...bounds) - 10, max: Math.max(...bounds) + 10 }),
  );

/** A stroke near the edges: times a single-precision step or less apart, levels and contrasts at their bounds. */
const edgeStroke = fc
  .record({
    startS: edgeNumber([0, 86_400, 4096, 1e4]),
    gap: fc.constantFrom(0, Number.MIN_VALUE, 1e-9, 1e-6, 2.5e-4, 4.9e-4, 5e-4, 1e-3, 0.25, 1.4),
    onsetDb: edgeNumber([-200, 60]),
    bodyDb: edgeNumber([-200, 60]),
    contrastDb: edgeNumber([-60, 60]),
    upper: fc.boolean(),
  })
  .map(({ startS, gap, upper, ...rest }) => {
    const clientId = randomUUID();
    return { clientId: upper ? clientId.toUpperCase() : clientId, index: 1, startS, endS: startS + gap, ...rest, flags: [] as string[] };
  });

describe("stroke figures at single precision's edges (schema alone)", () => {
  it("passes on each figure exactly as single precision stores it, and keeps end after start as stored", () => {
    fc.assert(
      fc.property(edgeStroke, (raw) => {
        const parsed = strokeInputSchema.safeParse(raw);
        if (!parsed.success) return;
        const s = parsed.data;
        for (const v of [s.startS, s.endS, s.onsetDb, s.bodyDb, s.contrastDb]) expect(Math.fround(v)).toBe(v);
        expect(s.endS).toBeGreaterThan(s.startS);
        expect(s.startS).toBeGreaterThanOrEqual(0);
        expect(Math.abs(s.contrastDb)).toBeLessThanOrEqual(60);
        expect(s.clientId).toBe(raw.clientId.toLowerCase());
      }),
      { numRuns: 2000 },
    );
  });

  it("refuses times one single-precision step apart or less, and figures past the bounds, on their own field", () => {
    // 86,399.99 and 86,399.995 are one float apart at most: 86,400 has a step of 1/128 s in single precision.
    const base = { clientId: randomUUID(), index: 1, onsetDb: -20, bodyDb: -30, contrastDb: 10, flags: [] };
    const paths = (over: Record<string, number>) => {
      const r = strokeInputSchema.safeParse({ ...base, startS: 1, endS: 2, ...over });
      return r.success ? [] : r.error.issues.map((i) => i.path.join("."));
    };
    expect(paths({ startS: 86_399.99, endS: 86_399.995 })).toEqual(["endS"]);
    expect(paths({ startS: 1, endS: 1 + 1e-9 })).toEqual(["endS"]);
    // 86,400.001 is 86,400 in single precision, the bound itself; 86,400.01 is a step past it.
    expect(paths({ startS: 1, endS: 86_400.001 })).toEqual([]);
    expect(paths({ startS: 1, endS: 86_400.01 })).toEqual(["endS"]);
    expect(paths({ contrastDb: 60.00001 })).toEqual(["contrastDb"]);
    expect(paths({ onsetDb: 1e39 })).toEqual(["onsetDb"]);
    // Below single precision's smallest value the column holds 0, and so does the schema.
    expect(strokeInputSchema.parse({ ...base, startS: 1e-46, endS: 1 }).startS).toBe(0);
  });
});

const backends: Array<[string, () => Promise<TestDatabase>]> = [["PGlite", () => freshPglite()]];
const server = serverUrl();
if (server) backends.push(["the PostgreSQL server", () => freshServerDatabase(server)]);

describe.each(backends)("stroke figures at single precision's edges on %s", (_name, open) => {
  let t: TestDatabase;
  let sessionId: string;
  let rhea: Awaited<ReturnType<typeof actorOf>>;
  beforeAll(async () => {
    t = await open();
    await seedDemoShop(t.db);
    rhea = await actorOf(t.db, "rhea@millrace.example");
    const seat = await seatId(t.db, "MHW-0142", "2I1");
    sessionId = randomUUID();
    // Started under an upper-case id, as some phones write them.
    await startSession(t.db, rhea, seat, { sessionId: sessionId.toUpperCase(), stage: "coarse", deviceId: "precision-phone" });
  });
  afterAll(async () => {
    await t?.cleanup();
  });

  it("stores every stroke the schema accepts, figure for figure as checked", async () => {
    let stored = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(edgeStroke, { minLength: 1, maxLength: 6 }), async (raws) => {
        const batch: StrokeInput[] = raws.flatMap((raw) => {
          const parsed = strokeInputSchema.safeParse(raw);
          return parsed.success ? [parsed.data] : [];
        });
        if (batch.length === 0) return;
        const result = await saveStrokes(t.db, rhea, sessionId.toUpperCase(), batch);
        expect(result.accepted + result.duplicates).toBe(batch.length);
        for (const s of batch) {
          const [row] = await t.db.select().from(strokes).where(eq(strokes.clientId, s.clientId));
          expect(row, s.clientId).toMatchObject({ sessionId, clientId: s.clientId });
          // The database answers a real as its shortest decimal text; rounded back, it is the figure checked.
          const asStored = [row!.startS, row!.endS, row!.onsetDb, row!.bodyDb, row!.contrastDb].map((v) => Math.fround(v));
          expect(asStored, s.clientId).toEqual([s.startS, s.endS, s.onsetDb, s.bodyDb, s.contrastDb]);
        }
        stored += batch.length;
      }),
      { numRuns: 150 },
    );
    // The edges are not all refusals: a good share of the cases reached the database.
    expect(stored).toBeGreaterThan(50);
  }, 120_000);

  it("counts a stroke resent with its id in another letter case as a duplicate", async () => {
    const stroke = strokeInputSchema.parse({ clientId: randomUUID().toUpperCase(), index: 7, startS: 14, endS: 15.4, onsetDb: -20, bodyDb: -30, contrastDb: 10 });
    const again = strokeInputSchema.parse({ ...stroke, clientId: stroke.clientId.toUpperCase() });
    expect((await saveStrokes(t.db, rhea, sessionId, [stroke])).accepted).toBe(1);
    expect(await saveStrokes(t.db, rhea, sessionId.toUpperCase(), [again])).toMatchObject({ accepted: 0, duplicates: 1 });
  });
});
