import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getDb } from "@/db/client";
import { customerChoices, engineSpecChoices, lapperChoices } from "@/db/queries/options";
import { JobForm } from "@/components/jobs/job-form";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { DEFAULT_HEAD_LAYOUT } from "@/lib/heads/layout";

export const metadata: Metadata = { title: "Book in a job" };

export default async function NewJobPage() {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "jobs:manage")) forbidden();
  const db = await getDb();
  const [customers, lappers, specs] = await Promise.all([
    customerChoices(db, actor.shopId),
    lapperChoices(db, actor.shopId),
    engineSpecChoices(db, actor.shopId),
  ]);
  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-4">
      <h1 className="text-2xl font-bold tracking-tight">Book in a job</h1>
      <JobForm
        customers={customers}
        lappers={lappers}
        specs={specs}
        layoutLocked={false}
        defaults={{
          customerId: "",
          newCustomerName: "",
          newCustomerContactName: "",
          newCustomerEmail: "",
          newCustomerPhone: "",
          newCustomerAddress: "",
          engineDescription: "",
          engineSpecId: "",
          promisedOn: "",
          assignedTechnicianId: "",
          notes: "",
          headLabel: "Cylinder head",
          ...DEFAULT_HEAD_LAYOUT,
        }}
      />
    </div>
  );
}
