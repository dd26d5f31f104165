// A seat is approved once: a second approval is refused with a message and writes nothing.
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEntries, reviews, seats } from "@/db/schema";
import { seedDemoShop } from "@/db/seed";
import { errorResponse } from "@/lib/errors";
import { reviewSeat } from "@/lib/review/service";
import { seatId } from "../bench/helpers";
import { freshPglite, type TestDatabase } from "../helpers/db";
import { actorOf } from "../sheets/helpers";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshPglite();
  await seedDemoShop(t.db);
});
afterAll(async () => {
  await t?.cleanup();
});

const count = async (table: typeof reviews | typeof auditEntries) => (await t.db.select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;

describe("second sign-off of one seat", () => {
  it("is refused as a conflict and leaves the first decision alone", async () => {
    const rhea = await actorOf(t.db, "rhea@millrace.example");
    const id = await seatId(t.db, "MHW-0141", "1I1"); // settled in the demo scenario
    await reviewSeat(t.db, rhea, { seatId: id, decision: "approved", comment: "Even ring, leak test dry." });
    const before = { reviews: await count(reviews), audit: await count(auditEntries) };
    const err = await reviewSeat(t.db, rhea, { seatId: id, decision: "approved", comment: "Approving again." }).catch((e: unknown) => e);
    const res = errorResponse(err);
    expect(res.status).toBe(409);
    expect(((await res.json()) as { message: string }).message).toMatch(/1I1/);
    expect({ reviews: await count(reviews), audit: await count(auditEntries) }).toEqual(before);
    const [row] = await t.db.select().from(seats).where(eq(seats.id, id));
    expect(row!.state).toBe("approved");
  });
});
