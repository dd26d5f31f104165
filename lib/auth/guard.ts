// The one gate every page, server action and route handler goes through. The session says who
// signed in; the users table says what they may do now (a changed role or a disabled account
// takes effect on the next request, not at the next sign-in).
import { eq } from "drizzle-orm";
import { getServerSession } from "next-auth";
import type { NextRequest } from "next/server";
import { getDb } from "@/db/client";
import { users, type UserRole } from "@/db/schema";
import { errorResponse, ForbiddenError, UnauthorizedError } from "@/lib/errors";
import { authOptions } from "./options";
import { can, type Permission } from "./roles";

export interface Actor {
  id: string;
  shopId: string;
  name: string;
  email: string;
  role: UserRole;
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

export async function currentActor(): Promise<Actor | null> {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  const db = await getDb();
  const [row] = await db
    .select({
      id: users.id,
      shopId: users.shopId,
      name: users.name,
      email: users.email,
      role: users.role,
      active: users.active,
    })
    .from(users)
    .where(eq(users.id, id))
    .limit(1);
  if (!row || !row.active) return null;
  return { id: row.id, shopId: row.shopId, name: row.name, email: row.email, role: row.role };
}

/** For server actions and server components: throws Unauthorized/Forbidden errors. */
export async function requireActor(permission?: Permission): Promise<Actor> {
  return authorize(await currentActor(), permission);
}

type RouteHandler<C> = (req: NextRequest, ctx: C, actor: Actor) => Promise<Response>;

/** Wraps a route handler: 401/403 as JSON before the handler runs, domain errors mapped after. */
export function guardedRoute<C>(permission: Permission, handler: RouteHandler<C>) {
  return async (req: NextRequest, ctx: C): Promise<Response> => {
    try {
      const actor = await requireActor(permission);
      return await handler(req, ctx, actor);
    } catch (err) {
      return errorResponse(err);
    }
  };
}
