// Shared pieces of the bench tests: demo seats by code, stroke inputs, calls into the real route
// handlers, and the settled rule worked out by hand.
import { randomUUID } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import { NextRequest } from "next/server";
import type { Db } from "@/db/client";
import { auditEntries, heads, jobs, lappingSessions, seats, strokes, users } from "@/db/schema";
import { seatCode } from "@/lib/heads/layout";
import type { StrokeInput } from "@/lib/validations/bench";
import { syntheticStroke } from "../helpers/strokes";

export const BASE_URL = "http://grindfade.test";

export async function userIds(db: Db): Promise<Map<string, string>> {
  const rows = await db.select({ id: users.id, email: users.email }).from(users);
  return new Map(rows.map((r) => [r.email, r.id]));
}

/** The id of a seat of a demo job, by its code ("3I1" = cylinder 3, intake 1). */
export async function seatId(db: Db, jobNumber: string, code: string): Promise<string> {
  const rows = await db
    .select({ seat: seats })
    .from(seats)
    .innerJoin(heads, eq(heads.id, seats.headId))
    .innerJoin(jobs, eq(jobs.id, heads.jobId))
    .where(eq(jobs.number, jobNumber));
  const found = rows.find((r) => seatCode(r.seat) === code);
  if (!found) throw new Error(`no seat ${code} on ${jobNumber}`);
  return found.seat.id;
}

export async function seatRow(db: Db, id: string) {
  const [row] = await db.select().from(seats).where(eq(seats.id, id));
  return row!;
}

export interface RowCounts {
  sessions: number;
  strokes: number;
  audit: number;
}

export async function counts(db: Db): Promise<RowCounts> {
  const n = async (table: typeof lappingSessions | typeof strokes | typeof auditEntries) =>
    (await db.select({ n: sql<number>`count(*)::int` }).from(table))[0]!.n;
  return { sessions: await n(lappingSessions), strokes: await n(strokes), audit: await n(auditEntries) };
}

export async function strokesOfSession(db: Db, sessionId: string) {
  return db.select().from(strokes).where(eq(strokes.sessionId, sessionId));
}

/** Moves a session's last sign of life back, as if its phone had gone quiet that long ago. */
export async function quietFor(db: Db, sessionId: string, seconds: number): Promise<void> {
  await db
    .update(lappingSessions)
    .set({ lastSeenAt: sql`now() - make_interval(secs => ${seconds})` })
    .where(eq(lappingSessions.id, sessionId));
}

export async function setJob(db: Db, jobNumber: string, values: Partial<typeof jobs.$inferInsert>): Promise<void> {
  await db.update(jobs).set(values).where(eq(jobs.number, jobNumber));
}

export async function setSeatState(db: Db, id: string, state: (typeof seats.$inferSelect)["state"]): Promise<void> {
  await db.update(seats).set({ state }).where(eq(seats.id, id));
}

export async function auditFor(db: Db, entityId: string, action: string) {
  return db
    .select()
    .from(auditEntries)
    .where(and(eq(auditEntries.entityId, entityId), eq(auditEntries.action, action)));
}

/** Strokes two seconds apart with the given contrasts, numbered from `firstIndex`. */
export function strokeInputs(contrastsDb: readonly number[], firstIndex = 1): StrokeInput[] {
  return contrastsDb.map((contrastDb, k) => syntheticStroke(firstIndex + k, contrastDb));
}

export function sessionBody(stage: "coarse" | "fine", deviceId: string, sessionId: string = randomUUID()) {
  return { sessionId, stage, deviceId, sampleRateHz: 48000, noiseFloorDb: -62 };
}

/** A request to the app; a string body is sent as it is, undefined sends none. */
export function jsonRequest(path: string, body?: unknown, method = "POST"): NextRequest {
  if (body === undefined) return new NextRequest(`${BASE_URL}${path}`, { method });
  return new NextRequest(`${BASE_URL}${path}`, {
    method,
    headers: { "content-type": "application/json" },
    body: typeof body === "string" ? body : JSON.stringify(body),
  });
}

export async function bodyOf(res: Response): Promise<Record<string, unknown>> {
  return (await res.json()) as Record<string, unknown>;
}

/**
 * Settled rule worked out by hand: the first stroke (1-based) ending a window of `consecutive`
 * strokes each ≤ maxDb whose least-squares slope is within ±maxSlope; null when none does.
 * Rule: 4 strokes ≤ 1.5 dB, |slope| ≤ 0.3 dB/stroke — Grindfade's documented rule
 * (lib/audio/README.md, "Settled").
 */
export function settledAtByHand(values: readonly number[], consecutive = 4, maxDb = 1.5, maxSlope = 0.3): number | null {
  for (let end = consecutive; end <= values.length; end++) {
    const w = values.slice(end - consecutive, end);
    if (w.some((v) => v > maxDb)) continue;
    if (Math.abs(slopeByHand(w)) <= maxSlope) return end;
  }
  return null;
}

/** Least-squares slope of values against 0, 1, 2, …: Σ(x−x̄)(y−ȳ) / Σ(x−x̄)². */
export function slopeByHand(values: readonly number[]): number {
  const n = values.length;
  const mx = (n - 1) / 2;
  const my = values.reduce((a, b) => a + b, 0) / n;
  let sxy = 0;
  let sxx = 0;
  values.forEach((v, i) => {
    sxy += (i - mx) * (v - my);
    sxx += (i - mx) ** 2;
  });
  return sxy / sxx;
}
