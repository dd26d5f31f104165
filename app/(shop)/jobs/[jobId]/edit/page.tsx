import type { Metadata } from "next";
import { forbidden, notFound } from "next/navigation";
import { z } from "zod";
import { getDb } from "@/db/client";
import { getJob } from "@/db/queries/jobs";
import { customerChoices, engineSpecChoices, lapperChoices } from "@/db/queries/options";
import { JobForm } from "@/components/jobs/job-form";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Edit job" };

export default async function EditJobPage({ params }: PageProps<"/jobs/[jobId]/edit">) {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "jobs:manage")) forbidden();
  const { jobId } = await params;
  if (!z.string().uuid().safeParse(jobId).success) notFound();
  const db = await getDb();
  const job = await getJob(db, actor.shopId, jobId);
  if (!job) notFound();
  const [customers, lappers, specs] = await Promise.all([
    customerChoices(db, actor.shopId),
    lapperChoices(db, actor.shopId),
    engineSpecChoices(db, actor.shopId, job.engineSpecId),
  ]);
  const head = job.heads[0];
  const locked = job.heads.some((h) => h.seats.some((s) => s.state !== "waiting"));
  return (
    <div className="mx-auto flex max-w-3xl flex-col gap-4">
      <h1 className="text-2xl font-bold tracking-tight">
        Edit <span className="figure">{job.number}</span>
      </h1>
      <JobForm
        jobId={job.id}
        customers={customers}
        lappers={lappers}
        specs={specs}
        layoutLocked={locked}
        defaults={{
          customerId: job.customer.id,
          newCustomerName: "",
          newCustomerContactName: "",
          newCustomerEmail: "",
          newCustomerPhone: "",
          newCustomerAddress: "",
          engineDescription: job.engineDescription,
          engineSpecId: job.engineSpecId ?? "",
          promisedOn: job.promisedOn ?? "",
          assignedTechnicianId: job.technician?.id ?? "",
          notes: job.notes ?? "",
          headLabel: head?.label ?? "Cylinder head",
          arrangement: head?.arrangement ?? "inline",
          cylinderCount: head?.cylinderCount ?? 4,
          intakeValvesPerCylinder: head?.intakeValvesPerCylinder ?? 2,
          exhaustValvesPerCylinder: head?.exhaustValvesPerCylinder ?? 2,
          camshaftCount: head?.camshaftCount ?? 2,
          journalsPerCamshaft: head?.journalsPerCamshaft ?? 5,
        }}
      />
    </div>
  );
}
