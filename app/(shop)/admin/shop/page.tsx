import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { getShop } from "@/db/queries/shops";
import { ShopSettingsForm } from "@/components/admin/shop-settings-form";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Shop details" };
export const dynamic = "force-dynamic";

export default async function ShopSettingsPage() {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "users:manage")) forbidden();
  const shop = await getShop(await getDb(), actor.shopId);
  if (!shop) forbidden();
  const zones = Intl.supportedValuesOf("timeZone");
  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Shop details</h1>
        <p className="text-stone-600">Printed at the head of every report, and shown to customers with it.</p>
      </div>
      <section className="rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <ShopSettingsForm shop={{ name: shop.name, address: shop.address, phone: shop.phone, timeZone: shop.timeZone }} zones={zones} />
      </section>
    </div>
  );
}
