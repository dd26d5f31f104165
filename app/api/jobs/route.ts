import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listJobs } from "@/db/queries/jobs";
import { guardedRoute } from "@/lib/auth/guard";

export const GET = guardedRoute("jobs:read", async (_req, _ctx, actor) => {
  const jobs = await listJobs(await getDb(), actor.shopId);
  return NextResponse.json({ jobs });
});
