// POST /api/sessions/{sessionId}/strokes, the busiest request the app answers: every phone at the
// bench sends each stroke as it is heard, and a phone catching up after an outage sends up to 500
// at once. Top-down: parse → authorise → write the batch (with the saves that arrived meanwhile)
// → judge the seats → answer. The signed-in check is here; the role, the session version and the
// session's own rules are checked against the database inside the batch (batch.ts), so a role
// changed since sign-in applies at once.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { sessionUser } from "@/lib/auth/guard";
import { errorResponse, UnauthorizedError } from "@/lib/errors";
import { isUuid, parseId, readJson } from "@/lib/http";
import { strokeBatchSchema } from "@/lib/validations/bench";
import { strokeQueueFor } from "./queue";

/** Who the request's session says is signed in; the users table has the last word. */
export type SignedIn = () => Promise<{ id: string; sv?: number } | null>;

/**
 * Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate.
 * 201 when something new was stored, 200 when everything was a resend.
 */
export async function answerStrokeSave(req: Request, rawSessionId: string, signedIn: SignedIn = sessionUser): Promise<Response> {
  try {
    const user = await signedIn();
    // A session naming no well-formed user id is not a session of ours.
    if (!user || !isUuid(user.id)) throw new UnauthorizedError();
    const sessionId = parseId(rawSessionId, "sessionId");
    const { strokes } = await readJson(req, strokeBatchSchema);
    const result = await strokeQueueFor(await getDb()).submit({ userId: user.id, sessionVersion: user.sv ?? 0, sessionId, strokes });
    return NextResponse.json(result, { status: result.accepted > 0 ? 201 : 200 });
  } catch (err) {
    return errorResponse(err);
  }
}
