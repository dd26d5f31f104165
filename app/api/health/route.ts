import { sql } from "drizzle-orm";
import { NextResponse } from "next/server";
import { getDatabase } from "@/db/client";

// Unauthenticated liveness check for the test harness and load balancers: says only whether
// the database answers.
export async function GET() {
  try {
    const { db, kind } = await getDatabase();
    await db.execute(sql`select 1`);
    return NextResponse.json({ ok: true, database: kind });
  } catch {
    return NextResponse.json({ ok: false, message: "The database is not available." }, { status: 503 });
  }
}
