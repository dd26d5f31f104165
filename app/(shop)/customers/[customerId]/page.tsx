import Link from "next/link";
import { forbidden, notFound } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { customerJobs, getCustomer } from "@/db/queries/customers";
import { CustomerForm } from "@/components/customers/customer-form";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { isUuid } from "@/lib/http";
import { JOB_STATUS_LABELS } from "@/lib/labels";

export const metadata: Metadata = { title: "Customer" };
export const dynamic = "force-dynamic";

export default async function CustomerPage({ params }: PageProps<"/customers/[customerId]">) {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "jobs:manage")) forbidden();
  const { customerId } = await params;
  if (!isUuid(customerId)) notFound();
  const db = await getDb();
  const customer = await getCustomer(db, actor.shopId, customerId);
  if (!customer) notFound();
  const jobs = await customerJobs(db, actor.shopId, customer.id);
  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-6">
      <Link href="/customers" className="inline-flex min-h-11 items-center self-start text-sm font-semibold text-brass-dark underline-offset-2 hover:underline">
        ← Customers
      </Link>
      <h1 className="text-2xl font-bold tracking-tight">{customer.name}</h1>
      <section aria-labelledby="edit-customer" className="rounded-xl border border-stone-300 bg-white p-4 sm:p-6">
        <h2 id="edit-customer" className="mb-3 text-lg font-semibold">
          Details
        </h2>
        <CustomerForm customer={customer} />
      </section>
      <section aria-labelledby="customer-jobs">
        <h2 id="customer-jobs" className="mb-3 text-lg font-semibold">
          Jobs ({customer.jobCount})
        </h2>
        {jobs.length === 0 ? (
          <p className="text-stone-600">No jobs booked in for this customer yet.</p>
        ) : (
          <ul className="flex flex-col gap-2" data-testid="customer-jobs">
            {jobs.map((j) => (
              <li key={j.id}>
                <Link href={`/jobs/${j.id}`} className="flex min-h-11 flex-wrap items-center gap-x-3 rounded-lg border border-stone-300 bg-white px-3 py-2">
                  <span className="figure font-semibold">{j.number}</span>
                  <span>{j.engineDescription}</span>
                  <span className="ml-auto text-sm text-stone-600">{JOB_STATUS_LABELS[j.status]}</span>
                </Link>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
