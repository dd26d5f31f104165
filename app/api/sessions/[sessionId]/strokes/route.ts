import type { NextRequest } from "next/server";
import { answerStrokeSave } from "@/lib/strokes/save-request";

/** Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate. */
export async function POST(req: NextRequest, ctx: RouteContext<"/api/sessions/[sessionId]/strokes">) {
  const { sessionId } = await ctx.params;
  return answerStrokeSave(req, sessionId);
}
