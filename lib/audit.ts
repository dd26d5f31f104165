// Writes to the append-only audit trail. Always called inside the transaction of the change it
// records, so a change and its entry land together or not at all.
import type { Db } from "@/db/client";
import { auditEntries } from "@/db/schema";

export interface AuditInput {
  actorId: string | null;
  action: string;
  entityType: string;
  entityId: string;
  jobId?: string | null;
  before?: unknown;
  after?: unknown;
}

type Writer = Pick<Db, "insert">;

export async function recordAudit(tx: Writer, entry: AuditInput): Promise<void> {
  await tx.insert(auditEntries).values({
    actorId: entry.actorId,
    action: entry.action,
    entityType: entry.entityType,
    entityId: entry.entityId,
    jobId: entry.jobId ?? null,
    before: entry.before ?? null,
    after: entry.after ?? null,
  });
}
