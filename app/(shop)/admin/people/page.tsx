import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { listPeople } from "@/db/queries/users";
import { CreatePersonForm } from "@/components/admin/create-person-form";
import { PersonRowActions } from "@/components/admin/person-row-actions";
import { currentActor } from "@/lib/auth/guard";
import { can, ROLE_LABELS } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "People" };

export default async function PeoplePage() {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "users:manage")) forbidden();
  const people = await listPeople(await getDb(), actor.shopId);
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">People</h1>
        <p className="text-stone-600">Who can sign in, and what each role may do.</p>
      </div>
      <section aria-labelledby="add-person" className="rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <h2 id="add-person" className="mb-3 text-lg font-semibold">
          Add a person
        </h2>
        <CreatePersonForm />
      </section>
      <section aria-labelledby="people-list">
        <h2 id="people-list" className="mb-3 text-lg font-semibold">
          Everyone in the shop
        </h2>
        <ul className="flex flex-col gap-3" data-testid="people-list">
          {people.map((p) => {
            const locked = p.locked;
            return (
              <li key={p.id} className="rounded-xl border border-stone-300 bg-white p-4">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <div>
                    <span className="font-semibold">{p.name}</span>{" "}
                    <span className="text-stone-600">{p.email}</span>
                  </div>
                  <div className="flex gap-2 text-sm">
                    <span className="rounded-full bg-stone-200 px-2.5 py-1 font-semibold">{ROLE_LABELS[p.role]}</span>
                    {locked ? (
                      <span className="rounded-full bg-rose-100 px-2.5 py-1 font-semibold text-rose-900">Locked</span>
                    ) : null}
                    {!p.active ? <span className="rounded-full bg-stone-100 px-2.5 py-1">Inactive</span> : null}
                  </div>
                </div>
                <PersonRowActions person={p} isSelf={p.id === actor.id} />
              </li>
            );
          })}
        </ul>
      </section>
    </div>
  );
}
