// Who may do what, decided from a signed-in person's role: pure, with no tie to next-auth, so the
// stroke save's batch (lib/strokes/batch.ts) decides for each save from the row it read.
import { users, type UserRole } from "@/db/schema";
import { ForbiddenError, UnauthorizedError } from "@/lib/errors";
import { can, type Permission } from "./roles";

export interface Actor {
  id: string;
  shopId: string;
  name: string;
  email: string;
  role: UserRole;
}

/** What every entry point reads of the signed-in person, on every request. */
export const actorColumns = {
  id: users.id,
  shopId: users.shopId,
  name: users.name,
  email: users.email,
  role: users.role,
  active: users.active,
  sessionVersion: users.sessionVersion,
};

/**
 * The person as the guard sees them, or null when the account is gone or disabled, or when the
 * session's token was made before the account's sessions were ended (a password reset, a
 * deactivation, "end all sessions"): `tokenVersion` is the token's, undefined when there is none
 * to compare (a caller inside the server).
 */
export function actorFromRow(row: (Actor & { active: boolean; sessionVersion: number }) | undefined, tokenVersion?: number): Actor | null {
  if (!row || !row.active) return null;
  if (tokenVersion !== undefined && tokenVersion !== row.sessionVersion) return null;
  return { id: row.id, shopId: row.shopId, name: row.name, email: row.email, role: row.role };
}

/** Pure decision, shared by every entry point: who may pass, with which error otherwise. */
export function authorize(actor: Actor | null, permission?: Permission): Actor {
  if (!actor) throw new UnauthorizedError();
  if (permission && !can(actor.role, permission)) {
    throw new ForbiddenError(forbiddenMessage(permission));
  }
  return actor;
}

export function forbiddenMessage(permission: Permission): string {
  switch (permission) {
    case "users:manage":
      return "Only an admin can manage people.";
    case "jobs:audit":
      return "Only a supervisor can audit and sign off work.";
    case "jobs:work":
      return "Only technicians and supervisors can record work on a job.";
    case "jobs:manage":
      return "Only a supervisor or an admin can book in and edit jobs.";
    case "specs:manage":
      return "Only a supervisor or an admin can change the specifications library.";
    default:
      return "Your role does not allow this.";
  }
}

