// The one gate every page, server action and route handler goes through. The session says who
// signed in; the users table says what they may do now (a changed role or a disabled account
// takes effect on the next request, not at the next sign-in).
import { eq } from "drizzle-orm";
import { getServerSession } from "next-auth";
import type { NextRequest } from "next/server";
import { getDb } from "@/db/client";
import { users, type UserRole } from "@/db/schema";
import { errorResponse } from "@/lib/errors";
import { isUuid } from "@/lib/http";
import { REQUEST_ID_HEADER, requestIdFrom } from "@/lib/log";
import { actorColumns, actorFromRow, authorize, type Actor } from "./authorize";
import { authOptions } from "./options";
import type { Permission } from "./roles";

export { authorize, forbiddenMessage, type Actor } from "./authorize";

/** Who the session cookie says is signed in, before the users table is read. */
export async function sessionUser(): Promise<{ id: string; role?: UserRole; sv: number } | null> {
  const session = await getServerSession(authOptions);
  // A token made before session versions counts as version 0.
  return session?.user?.id ? { id: session.user.id, role: session.user.role, sv: session.user.sv ?? 0 } : null;
}

export async function currentActor(): Promise<Actor | null> {
  const user = await sessionUser();
  if (!user || !isUuid(user.id)) return null;
  const db = await getDb();
  const [row] = await db.select(actorColumns).from(users).where(eq(users.id, user.id)).limit(1);
  return actorFromRow(row, user.sv);
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
      return errorResponse(err, requestIdFrom(req.headers.get(REQUEST_ID_HEADER)));
    }
  };
}
