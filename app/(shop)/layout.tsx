import { redirect } from "next/navigation";
import { getDb } from "@/db/client";
import { getShop } from "@/db/queries/shops";
import { AppShell } from "@/components/shell/app-shell";
import { Providers } from "@/components/providers";
import { ShopTimeZone } from "@/components/shop-time-zone";
import { usableTimeZone } from "@/lib/dates";
import { currentActor } from "@/lib/auth/guard";

export default async function ShopLayout({ children }: { children: React.ReactNode }) {
  const actor = await currentActor();
  if (!actor) redirect("/sign-in");
  const shop = await getShop(await getDb(), actor.shopId);
  return (
    <Providers>
      <ShopTimeZone value={usableTimeZone(shop?.timeZone)}>
        <AppShell actor={actor} shopName={shop?.name ?? "Shop"}>
          {children}
        </AppShell>
      </ShopTimeZone>
    </Providers>
  );
}
