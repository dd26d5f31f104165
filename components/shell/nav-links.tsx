"use client";

import Link from "next/link";
import { usePathname, useSearchParams } from "next/navigation";
import { useState } from "react";
import type { NavItem } from "@/lib/navigation";

function isActive(item: NavItem, pathname: string, search: URLSearchParams): boolean {
  const url = new URL(item.href, "http://x");
  if (url.pathname !== pathname) return false;
  const wanted = [...url.searchParams.entries()];
  if (wanted.length === 0) return !search.has("mine") && !search.has("status");
  return wanted.every(([k, v]) => search.get(k) === v);
}

export function NavLinks({ items }: { items: readonly NavItem[] }) {
  const pathname = usePathname();
  const search = useSearchParams();
  const [open, setOpen] = useState(false);
  const links = items.map((item) => {
    const active = isActive(item, pathname, search);
    return (
      <Link
        key={item.href}
        href={item.href}
        onClick={() => setOpen(false)}
        aria-current={active ? "page" : undefined}
        className={`flex min-h-12 items-center rounded-lg px-4 text-base font-semibold ${
          active ? "bg-amber-400 text-ink" : "text-stone-100 hover:bg-stone-700"
        }`}
      >
        {item.label}
      </Link>
    );
  });
  return (
    <>
      <nav aria-label="Main" className="hidden items-center gap-1 xl:flex">
        {links}
      </nav>
      <button
        type="button"
        className="min-h-12 min-w-12 rounded-lg border border-stone-600 px-3 text-base font-semibold text-white xl:hidden"
        aria-expanded={open}
        aria-controls="mobile-nav"
        onClick={() => setOpen((v) => !v)}
      >
        {open ? "Close" : "Menu"}
      </button>
      {open ? (
        <nav
          id="mobile-nav"
          aria-label="Main"
          className="absolute inset-x-0 top-full z-20 flex flex-col gap-1 border-t border-stone-700 bg-ink p-3 shadow-lg xl:hidden"
        >
          {links}
        </nav>
      ) : null}
    </>
  );
}
