// The customer's link to one job's report: 256 random bits, sent in the sign-off mail and kept
// here only as their SHA-256, so a copy of the database opens nothing. A link expires (30 days
// by default) and a supervisor can revoke it; each opening is an audit entry with no actor.
import { createHash, randomBytes } from "node:crypto";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { z } from "zod";
import type { Db } from "@/db/client";
import { auditEntries, customerLinks, jobs, users, type CustomerLink } from "@/db/schema";
import type { Actor } from "@/lib/auth/guard";
import { recordAudit } from "@/lib/audit";
import { ConflictError, NotFoundError } from "@/lib/errors";
import { assertSupervisor } from "@/lib/review/service";

export const LINK_DAYS = 30;

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
type Writer = Pick<Db, "insert">;

/** 32 random bytes in base64url: 43 characters of A–Z, a–z, 0–9, "-" and "_". */
export const linkTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{43}$/, "That is not a report link.");

export const hashLinkToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");

/** Where the shop's pages are reached from outside: NEXTAUTH_URL, as the sign-in uses. */
export function publicBase(): string {
  return (process.env.NEXTAUTH_URL ?? "http://localhost:3000").replace(/\/$/, "");
}

export const reportUrl = (token: string) => `${publicBase()}/r/${token}`;

/** Makes a new link to the job's report inside the caller's transaction; the token is returned once. */
export async function createCustomerLink(
  tx: Writer,
  input: { jobId: string; createdById: string; now?: Date; days?: number },
): Promise<{ id: string; token: string; url: string; expiresAt: Date }> {
  const now = input.now ?? new Date();
  const expiresAt = new Date(now.getTime() + (input.days ?? LINK_DAYS) * 86_400_000);
  const token = randomBytes(32).toString("base64url");
  const [row] = await tx
    .insert(customerLinks)
    .values({ jobId: input.jobId, tokenHash: hashLinkToken(token), expiresAt, createdById: input.createdById, createdAt: now })
    .returning({ id: customerLinks.id });
  await recordAudit(tx, {
    actorId: input.createdById,
    action: "customer_link.created",
    entityType: "customer_link",
    entityId: row!.id,
    jobId: input.jobId,
    after: { expiresAt: expiresAt.toISOString() },
  });
  return { id: row!.id, token, url: reportUrl(token), expiresAt };
}

export type LinkOpening =
  | { kind: "open"; link: CustomerLink }
  | { kind: "gone"; why: "expired" | "revoked"; link: CustomerLink }
  | { kind: "unknown" };

/**
 * Looks a presented token up and records the opening: an opened link and a refused (expired or
 * revoked) one each leave an audit entry with no actor; a token that is no link leaves nothing,
 * as there is no job to file it under.
 */
export async function openCustomerLink(db: Db, token: string, now: Date = new Date()): Promise<LinkOpening> {
  if (!linkTokenSchema.safeParse(token).success) return { kind: "unknown" };
  return db.transaction(async (tx) => {
    const [link] = await tx.select().from(customerLinks).where(eq(customerLinks.tokenHash, hashLinkToken(token))).limit(1);
    if (!link) return { kind: "unknown" } as const;
    const why = link.revokedAt ? "revoked" : link.expiresAt <= now ? "expired" : null;
    await recordAudit(tx, {
      actorId: null,
      action: why ? "customer_link.refused" : "customer_link.opened",
      entityType: "customer_link",
      entityId: link.id,
      jobId: link.jobId,
      after: why ? { why } : { expiresAt: link.expiresAt.toISOString() },
    });
    return why ? ({ kind: "gone", why, link } as const) : ({ kind: "open", link } as const);
  });
}

export interface CustomerLinkView {
  id: string;
  createdAt: string;
  createdBy: string;
  expiresAt: string;
  revokedAt: string | null;
  revokedBy: string | null;
  status: "live" | "expired" | "revoked";
  openings: number;
  lastOpenedAt: string | null;
}

/** A job's links, newest first, with how often each was opened; for the job page. */
export async function listCustomerLinks(db: Db, shopId: string, jobId: string, now: Date = new Date()): Promise<CustomerLinkView[]> {
  const rows = await db
    .select({ link: customerLinks, createdBy: users.name })
    .from(customerLinks)
    .innerJoin(jobs, eq(jobs.id, customerLinks.jobId))
    .innerJoin(users, eq(users.id, customerLinks.createdById))
    .where(and(eq(customerLinks.jobId, jobId), eq(jobs.shopId, shopId)))
    .orderBy(desc(customerLinks.createdAt), asc(customerLinks.id));
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.link.id);
  const opened = await db
    .select({ id: auditEntries.entityId, n: sql<number>`count(*)::int`, last: sql<string | null>`max(${auditEntries.at})` })
    .from(auditEntries)
    .where(and(eq(auditEntries.entityType, "customer_link"), eq(auditEntries.action, "customer_link.opened"), inArray(auditEntries.entityId, ids)))
    .groupBy(auditEntries.entityId);
  const revokers = rows.map((r) => r.link.revokedById).filter((id): id is string => Boolean(id));
  const names = revokers.length ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, revokers)) : [];
  return rows.map(({ link, createdBy }) => {
    const o = opened.find((x) => x.id === link.id);
    return {
      id: link.id,
      createdAt: link.createdAt.toISOString(),
      createdBy,
      expiresAt: link.expiresAt.toISOString(),
      revokedAt: link.revokedAt?.toISOString() ?? null,
      revokedBy: names.find((n) => n.id === link.revokedById)?.name ?? null,
      status: link.revokedAt ? "revoked" : link.expiresAt <= now ? "expired" : "live",
      openings: o ? Number(o.n) : 0,
      lastOpenedAt: o?.last ? new Date(o.last).toISOString() : null,
    };
  });
}

/** A supervisor revokes a link of their shop: it answers 410 from then on. Audited with the change. */
export async function revokeCustomerLink(db: Db, actor: Actor, input: { linkId: string }): Promise<{ jobId: string; jobNumber: string }> {
  assertSupervisor(actor);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .select({ link: customerLinks, number: jobs.number })
      .from(customerLinks)
      .innerJoin(jobs, eq(jobs.id, customerLinks.jobId))
      .where(and(eq(customerLinks.id, input.linkId), eq(jobs.shopId, actor.shopId)))
      .limit(1)
      .for("update", { of: customerLinks });
    if (!row) throw new NotFoundError("That report link does not exist in your shop.");
    if (row.link.revokedAt) throw new ConflictError(`That link to ${row.number}'s report is already revoked.`);
    const now = new Date();
    await tx.update(customerLinks).set({ revokedAt: now, revokedById: actor.id }).where(eq(customerLinks.id, row.link.id));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "customer_link.revoked",
      entityType: "customer_link",
      entityId: row.link.id,
      jobId: row.link.jobId,
      before: { revokedAt: null },
      after: { revokedAt: now.toISOString() },
    });
    return { jobId: row.link.jobId, jobNumber: row.number };
  });
}

/** Every live link of a job, revoked by the given person inside their transaction (a reopened head). */
export async function revokeLiveLinks(tx: Tx, jobId: string, actorId: string, why: string): Promise<number> {
  const now = new Date();
  const revoked = await tx
    .update(customerLinks)
    .set({ revokedAt: now, revokedById: actorId })
    .where(and(eq(customerLinks.jobId, jobId), isNull(customerLinks.revokedAt)))
    .returning({ id: customerLinks.id });
  for (const r of revoked) {
    await recordAudit(tx, {
      actorId,
      action: "customer_link.revoked",
      entityType: "customer_link",
      entityId: r.id,
      jobId,
      before: { revokedAt: null },
      after: { revokedAt: now.toISOString(), why },
    });
  }
  return revoked.length;
}
