import type { Metadata } from "next";
import { Forbidden } from "@/components/ui/forbidden";
import { currentActor } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Not for your role" };

const ROLE_NAMES = { technician: "a technician", supervisor: "a supervisor", admin: "an admin" } as const;

// Shown with a 403 wherever a page calls forbidden(): the signed-in person's role lacks the page.
export default async function ForbiddenPage() {
  const actor = await currentActor();
  const who = actor ? `You are signed in as ${ROLE_NAMES[actor.role]}. ` : "";
  return (
    <main className="mx-auto flex min-h-dvh max-w-md flex-col items-center justify-center p-6">
      <Forbidden message={`${who}This page is for another role; ask a supervisor or an admin if you need what it does.`} />
    </main>
  );
}
