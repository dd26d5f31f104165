import { redirect } from "next/navigation";
import { requireActor } from "@/lib/auth/guard";

// Where signing in lands: a technician on their own work, everyone else on the whole board.
export default async function Home() {
  const actor = await requireActor("jobs:read");
  redirect(actor.role === "technician" ? "/jobs?mine=1" : "/jobs");
}
