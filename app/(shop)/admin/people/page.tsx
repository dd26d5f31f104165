import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { getShop } from "@/db/queries/shops";
import { listPeople } from "@/db/queries/users";
import { CreatePersonForm } from "@/components/admin/create-person-form";
import { PeopleTable } from "@/components/admin/people-table";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { formatWhen, usableTimeZone } from "@/lib/dates";

export const metadata: Metadata = { title: "People" };

export default async function PeoplePage() {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "users:manage")) forbidden();
  const db = await getDb();
  const [people, shop] = await Promise.all([
    listPeople(db, actor.shopId),
    getShop(db, actor.shopId),
  ]);
  const timeZone = usableTimeZone(shop?.timeZone);
  const rows = people.map((p) => ({
    ...p,
    lastSignInLabel: p.lastSignInAt ? formatWhen(p.lastSignInAt, timeZone) : null,
  }));
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">People</h1>
        <p className="text-stone-600">
          Who can sign in, and what each role may do. Someone who leaves is deactivated, not
          removed: their jobs, reviews and audit entries keep their name.
        </p>
      </div>
      <section aria-labelledby="people-list">
        <h2 id="people-list" className="mb-3 text-lg font-semibold">
          Everyone in the shop
        </h2>
        <PeopleTable people={rows} selfId={actor.id} />
      </section>
      <section
        aria-labelledby="add-person"
        className="rounded-xl border border-stone-300 bg-white p-4 sm:p-6"
      >
        <h2 id="add-person" className="mb-3 text-lg font-semibold">
          Add a person
        </h2>
        <CreatePersonForm />
      </section>
    </div>
  );
}
