// POST /api/sessions/{sessionId}/strokes, the busiest request the app answers: every phone at the
// bench sends each stroke as it is heard. The route handler and the production server's own
// request path (server.ts) both answer it here, so the two cannot drift apart; they differ only
// in how they read the body and who is signed in, and in how they send the answer.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import type { UserRole } from "@/db/schema";
import { errorAnswer, UnauthorizedError } from "@/lib/errors";
import { isUuid, parseId, readJson } from "@/lib/http";
import type { ZodType } from "zod";
import { strokeBatchSchema } from "@/lib/validations/bench";
import { strokeQueueFor } from "./stroke-batch";

/** Who the request's session says is signed in; the users table has the last word. */
export type SignedInUser = { id: string; role?: UserRole; sv?: number } | null;

/** How the two doors hand over the body: read and checked against the schema, as readJson does. */
export type BodyReader = <T>(schema: ZodType<T>) => Promise<T>;

/**
 * Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate.
 * 201 when something new was stored, 200 when everything was a resend. The answer's status and
 * JSON body, for either door to send.
 */
export async function answerStrokes(readBody: BodyReader, rawSessionId: string, signedIn: () => Promise<SignedInUser>): Promise<{ status: number; body: unknown }> {
  try {
    const user = await signedIn();
    // A session naming no well-formed user id is not a session of ours.
    if (!user || !isUuid(user.id)) throw new UnauthorizedError();
    // The role and the session version are read from the users table with the save (stroke-batch.ts),
    // never from the token: a role changed since sign-in applies at once, either way.
    const sessionId = parseId(rawSessionId, "sessionId");
    const { strokes } = await readBody(strokeBatchSchema);
    const result = await strokeQueueFor(await getDb()).submit({ userId: user.id, sessionVersion: user.sv ?? 0, sessionId, strokes });
    return { status: result.accepted > 0 ? 201 : 200, body: result };
  } catch (err) {
    return errorAnswer(err);
  }
}

/** The route handler's door. */
export async function postStrokes(req: Request, rawSessionId: string, signedIn: () => Promise<SignedInUser>): Promise<Response> {
  const { status, body } = await answerStrokes((schema) => readJson(req, schema), rawSessionId, signedIn);
  return NextResponse.json(body, { status });
}
