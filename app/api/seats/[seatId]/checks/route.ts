// A seat's done-checks (contact ring, marking-compound test, leak test), with the contact width
// from its measurements: read by the bench screen's done-checks section. Recording one is the
// server action in lib/actions/done-checks.ts.
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { guardedRoute } from "@/lib/auth/guard";
import { getSeatDoneChecks } from "@/lib/bench/done-checks";
import { parseId } from "@/lib/http";

export const GET = guardedRoute("jobs:read", async (_req, ctx: RouteContext<"/api/seats/[seatId]/checks">, actor) => {
  const { seatId } = await ctx.params;
  return NextResponse.json(await getSeatDoneChecks(await getDb(), actor, parseId(seatId, "seatId")));
});
