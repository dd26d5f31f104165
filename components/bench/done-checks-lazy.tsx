"use client";

// The done-checks section loads after the bench screen is up, like the photos: the phone's first
// load is for listening.
import dynamic from "next/dynamic";

export const LazyDoneChecks = dynamic(() => import("./done-checks").then((m) => m.DoneChecks), {
  loading: () => <div className="h-14 animate-pulse rounded-xl bg-stone-200" />,
});
