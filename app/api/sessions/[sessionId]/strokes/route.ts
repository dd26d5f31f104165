import type { NextRequest } from "next/server";
import { sessionUser } from "@/lib/auth/guard";
import { postStrokes } from "@/lib/bench/stroke-ingest";

/** Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate. */
export async function POST(req: NextRequest, ctx: RouteContext<"/api/sessions/[sessionId]/strokes">) {
  const { sessionId } = await ctx.params;
  return postStrokes(req, sessionId, sessionUser);
}
