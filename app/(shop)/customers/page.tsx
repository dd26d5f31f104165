import Link from "next/link";
import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { listCustomers } from "@/db/queries/customers";
import { CustomerForm } from "@/components/customers/customer-form";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Customers" };
export const dynamic = "force-dynamic";

export default async function CustomersPage() {
  const actor = await currentActor();
  // Customers' contact details are for those who book in and sign off: supervisors and admins.
  if (!actor || !can(actor.role, "jobs:manage")) forbidden();
  const customers = await listCustomers(await getDb(), actor.shopId);
  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Customers</h1>
        <p className="text-stone-600">Who the shop works for, and how to reach them. Signed-off reports go to the customer&apos;s e-mail.</p>
      </div>
      <section aria-labelledby="customer-list">
        <h2 id="customer-list" className="mb-3 text-lg font-semibold">
          Every customer
        </h2>
        {customers.length === 0 ? (
          <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center text-stone-600">No customers yet. Add one below, or book in a job.</p>
        ) : (
          <div className="overflow-x-auto rounded-xl border border-stone-300 bg-white">
            <table className="w-full min-w-[44rem] text-left text-sm" data-testid="customer-list">
              <thead className="bg-stone-100">
                <tr>
                  <th scope="col" className="px-3 py-2">Customer</th>
                  <th scope="col" className="px-3 py-2">Contact person</th>
                  <th scope="col" className="px-3 py-2">E-mail</th>
                  <th scope="col" className="px-3 py-2">Phone</th>
                  <th scope="col" className="px-3 py-2">Address</th>
                  <th scope="col" className="px-3 py-2 text-right">Jobs</th>
                </tr>
              </thead>
              <tbody>
                {customers.map((c) => (
                  <tr key={c.id} className="border-t border-stone-200 align-top" data-customer={c.name}>
                    <th scope="row" className="px-3 py-1 font-semibold">
                      <Link href={`/customers/${c.id}`} className="inline-flex min-h-11 items-center text-brass-dark underline underline-offset-2">
                        {c.name}
                      </Link>
                    </th>
                    <td className="px-3 py-3">{c.contactName ?? <span className="text-stone-500">—</span>}</td>
                    <td className="px-3 py-3">
                      {c.email ? (
                        <a href={`mailto:${c.email}`} className="inline-flex min-h-11 items-center underline underline-offset-2">
                          {c.email}
                        </a>
                      ) : (
                        <span className="font-semibold text-amber-800">No e-mail: the report cannot be sent to them</span>
                      )}
                    </td>
                    <td className="px-3 py-3">
                      {c.phone ? (
                        <a href={`tel:${c.phone.replace(/[^0-9+]/g, "")}`} className="figure inline-flex min-h-11 items-center underline underline-offset-2">
                          {c.phone}
                        </a>
                      ) : (
                        <span className="text-stone-500">—</span>
                      )}
                    </td>
                    <td className="whitespace-pre-line px-3 py-3">{c.address ?? <span className="text-stone-500">—</span>}</td>
                    <td className="figure px-3 py-3 text-right" data-testid="customer-job-count">
                      {c.jobCount}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      <section aria-labelledby="add-customer" className="rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <h2 id="add-customer" className="mb-3 text-lg font-semibold">
          Add a customer
        </h2>
        <CustomerForm />
      </section>
    </div>
  );
}
