import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { saveStrokes } from "@/lib/bench/service";
import { parseId, readJson } from "@/lib/http";
import { strokeBatchSchema } from "@/lib/validations/bench";

/** Saves one or more strokes; a stroke already saved under its clientId is counted as a duplicate. */
export const POST = guardedRoute("jobs:work", async (req, ctx: RouteContext<"/api/sessions/[sessionId]/strokes">, actor) => {
  const { sessionId } = await ctx.params;
  const { strokes } = await readJson(req, strokeBatchSchema);
  const result = await saveStrokes(await getDb(), actor, parseId(sessionId, "sessionId"), strokes);
  return NextResponse.json(result, { status: result.accepted > 0 ? 201 : 200 });
});
