// POST /api/sessions/{sessionId}/strokes, the busiest request the app answers: every phone at the
// bench sends each stroke as it is heard. The route handler and the production server's own
// request path (server.ts) both answer it here, so the two cannot drift apart; they differ only
// in how they read who is signed in.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { forbiddenMessage } from "@/lib/auth/authorize";
import { can } from "@/lib/auth/roles";
import type { UserRole } from "@/db/schema";
import { errorResponse, ForbiddenError, UnauthorizedError } from "@/lib/errors";
import { isUuid, parseId, readJson } from "@/lib/http";
import { strokeBatchSchema } from "@/lib/validations/bench";
import { strokeQueueFor } from "./stroke-batch";

/** Who the request's session says is signed in; the users table has the last word. */
export type SignedInUser = { id: string; role?: UserRole } | null;

/**
 * Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate.
 * 201 when something new was stored, 200 when everything was a resend.
 */
export async function postStrokes(req: Request, rawSessionId: string, signedIn: () => Promise<SignedInUser>): Promise<Response> {
  try {
    const user = await signedIn();
    // A session naming no well-formed user id is not a session of ours.
    if (!user || !isUuid(user.id)) throw new UnauthorizedError();
    // The role in the session answers early; the save checks it again against the users table.
    if (user.role && !can(user.role, "jobs:work")) throw new ForbiddenError(forbiddenMessage("jobs:work"));
    const sessionId = parseId(rawSessionId, "sessionId");
    const { strokes } = await readJson(req, strokeBatchSchema);
    const result = await strokeQueueFor(await getDb()).submit({ userId: user.id, sessionId, strokes });
    return NextResponse.json(result, { status: result.accepted > 0 ? 201 : 200 });
  } catch (err) {
    return errorResponse(err);
  }
}
