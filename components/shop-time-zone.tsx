"use client";

// The shop's time zone for client components; server components read it with getShopTimeZone.
import { createContext, useContext } from "react";
import { DEFAULT_TIME_ZONE } from "@/lib/dates";

const ShopTimeZoneContext = createContext<string>(DEFAULT_TIME_ZONE);

export function ShopTimeZone({ value, children }: { value: string; children: React.ReactNode }) {
  return <ShopTimeZoneContext.Provider value={value}>{children}</ShopTimeZoneContext.Provider>;
}

export const useShopTimeZone = () => useContext(ShopTimeZoneContext);
