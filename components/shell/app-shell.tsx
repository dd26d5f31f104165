import Link from "next/link";
import { Suspense } from "react";
import type { Actor } from "@/lib/auth/guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { NAVIGATION } from "@/lib/navigation";
import { NavLinks } from "./nav-links";
import { SignOutButton } from "./sign-out-button";

export function AppShell({ actor, shopName, children }: { actor: Actor; shopName: string; children: React.ReactNode }) {
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="relative bg-ink text-white print:hidden">
        <div className="mx-auto flex max-w-7xl items-center gap-3 px-3 py-2 sm:px-6">
          <Link href="/jobs" className="mr-2 flex min-h-12 items-center gap-2 font-bold tracking-tight">
            <span aria-hidden className="inline-block h-6 w-6 rounded-full border-4 border-amber-400" />
            <span className="text-lg">Grindfade</span>
          </Link>
          <Suspense fallback={null}>
            <NavLinks items={NAVIGATION[actor.role]} />
          </Suspense>
          <div className="ml-auto flex items-center gap-2">
            <div className="hidden text-right text-sm leading-tight sm:block" data-testid="signed-in-as">
              <div className="font-semibold">{actor.name}</div>
              <div className="text-stone-300">
                {ROLE_LABELS[actor.role]} · {shopName}
              </div>
            </div>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 px-3 py-4 sm:px-6 sm:py-6">{children}</main>
    </div>
  );
}
