import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { endSession } from "@/lib/bench/service";
import { parseId } from "@/lib/http";

export const POST = guardedRoute("jobs:work", async (_req, ctx: RouteContext<"/api/sessions/[sessionId]/end">, actor) => {
  const { sessionId } = await ctx.params;
  await endSession(await getDb(), actor, parseId(sessionId, "sessionId"));
  return NextResponse.json({ ok: true });
});
