import { redirect } from "next/navigation";
import { currentActor } from "@/lib/auth/guard";

// The bench screen has no shell: the whole phone screen is for the seat being lapped.
export default async function BenchLayout({ children }: { children: React.ReactNode }) {
  if (!(await currentActor())) redirect("/sign-in");
  return children;
}
