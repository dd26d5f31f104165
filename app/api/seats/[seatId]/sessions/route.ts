import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { startSession } from "@/lib/bench/service";
import { parseId, readJson } from "@/lib/http";
import { startSessionSchema } from "@/lib/validations/bench";

export const POST = guardedRoute("jobs:work", async (req, ctx: RouteContext<"/api/seats/[seatId]/sessions">, actor) => {
  const { seatId } = await ctx.params;
  const input = await readJson(req, startSessionSchema);
  const result = await startSession(await getDb(), actor, parseId(seatId, "seatId"), input);
  return NextResponse.json(result, { status: result.resumed ? 200 : 201 });
});
