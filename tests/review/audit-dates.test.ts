// Day filters at the edges of what a timestamp holds: the audit API answers 400 with a sentence
// for a day outside the years it takes, and 200 at both ends of them, never 500, on PGlite and on
// the PostgreSQL server. The year 10000 is the edge that mattered: a filter's "to" runs to the end
// of its day, and 9999-12-31 ran into a year a timestamp's text cannot carry.
import { NextRequest } from "next/server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TestDatabase } from "../helpers/db";
import { mockAppContext } from "../helpers/app-mocks";

const state = mockAppContext();
const { freshPglite, freshServerDatabase, serverUrl } = await import("../helpers/db");
const { seedDemoShop } = await import("@/db/seed");
const auditRoute = await import("@/app/api/audit/route");
const { isCalendarDate } = await import("@/lib/validations/text");
const { jobFormSchema } = await import("@/lib/validations/jobs");
const h = await import("../sheets/helpers");

const backends: Array<[string, () => Promise<TestDatabase>]> = [["PGlite", () => freshPglite()]];
const server = serverUrl();
if (server) backends.push(["the PostgreSQL server", () => freshServerDatabase(server)]);

describe("calendar dates", () => {
  it("reads years 0 to 99 as themselves, not as 1900 to 1999", () => {
    expect(isCalendarDate("0099-12-31")).toBe(true);
    expect(isCalendarDate("0000-02-29")).toBe(true); // year 0 is a leap year in the proleptic Gregorian calendar (ISO 8601)
    expect(isCalendarDate("1900-02-29")).toBe(false); // 1900 is not a leap year (Gregorian rule)
    expect(isCalendarDate("2024-02-29")).toBe(true);
  });

  it("keeps a job's promised day within the years taken", () => {
    const shape = jobFormSchema.shape as Record<string, { safeParse(v: unknown): { success: boolean } }>;
    expect(shape.promisedOn!.safeParse("9999-12-31").success).toBe(false);
    expect(shape.promisedOn!.safeParse("0001-01-01").success).toBe(false);
    expect(shape.promisedOn!.safeParse("2026-12-24").success).toBe(true);
  });
});

describe.each(backends)("audit day filters on %s", (_name, open) => {
  let t: TestDatabase;
  beforeAll(async () => {
    t = await open();
    state.t = t;
    await seedDemoShop(t.db);
    state.session = { user: { id: (await h.actorOf(t.db, "rhea@millrace.example")).id } };
  });
  afterAll(async () => {
    await t?.cleanup();
  });

  const get = async (query: string) => {
    const res = await auditRoute.GET(new NextRequest(`http://grindfade.test/api/audit?${query}`), { params: Promise.resolve({}) });
    return { status: res.status, body: (await res.json()) as { message?: string; fieldErrors?: Record<string, string[]> } };
  };

  it("answers 400 naming the field for days outside the years taken", async () => {
    for (const [query, field] of [
      ["to=9999-12-31", "to"],
      ["from=9999-12-31", "from"],
      ["from=0000-01-01", "from"],
      ["from=0001-01-01&to=0001-01-02", "from"],
      ["to=1899-12-31", "to"],
    ] as const) {
      const { status, body } = await get(query);
      expect(status, query).toBe(400);
      expect(body.fieldErrors?.[field], query).toEqual([expect.stringMatching(/between 1900 and 9998/)]);
    }
  });

  it("answers 200 at both ends of them", async () => {
    expect((await get("from=1900-01-01&to=9998-12-31")).status).toBe(200);
    expect((await get("from=9998-12-31")).status).toBe(200);
  });
});
