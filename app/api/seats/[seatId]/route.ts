import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { getSeatReport } from "@/lib/bench/service";
import { parseId } from "@/lib/http";

/** The seat with its sessions, strokes and the server's verdict per stage. */
export const GET = guardedRoute("jobs:read", async (_req, ctx: RouteContext<"/api/seats/[seatId]">, actor) => {
  const { seatId } = await ctx.params;
  const report = await getSeatReport(await getDb(), actor, parseId(seatId, "seatId"));
  return NextResponse.json(report);
});
