"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { useForm, type FieldPath } from "react-hook-form";
import type { Choice } from "@/db/queries/options";
import { createJob, updateJob } from "@/lib/actions/jobs";
import { jobFormSchema, type JobFormInput, type JobFormValues } from "@/lib/validations/jobs";

const field = "min-h-12 w-full rounded-lg border border-stone-400 bg-white px-3 text-base";

export function JobForm({
  jobId,
  defaults,
  customers,
  lappers,
  specs,
  layoutLocked,
}: {
  jobId?: string;
  defaults: JobFormInput;
  customers: Choice[];
  lappers: Choice[];
  specs: Choice[];
  layoutLocked: boolean;
}) {
  const router = useRouter();
  const [pending, startTransition] = useTransition();
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    watch,
    getValues,
    formState: { errors },
  } = useForm<JobFormInput, unknown, JobFormValues>({ resolver: zodResolver(jobFormSchema), defaultValues: defaults });

  // The server parses the same raw form values with the same schema, so it gets what was typed.
  const onSubmit = handleSubmit(() =>
    startTransition(async () => {
      const raw = getValues();
      const state = jobId ? await updateJob(jobId, raw) : await createJob(raw);
      for (const [key, msgs] of Object.entries(state.fieldErrors)) setError(key as FieldPath<JobFormInput>, { message: msgs[0] });
      setMessage(state.message ? { ok: state.ok, text: state.message } : null);
      if (state.ok && state.jobId) router.push(`/jobs/${state.jobId}`);
    }),
  );

  const err = (name: FieldPath<JobFormInput>) => {
    const e = errors[name as keyof typeof errors];
    return e?.message ? (
      <p id={`${name}-error`} className="text-sm text-rose-700" aria-live="polite">
        {String(e.message)}
      </p>
    ) : null;
  };
  const described = (name: string) => ({ "aria-describedby": `${name}-error` });
  const customerId = watch("customerId");

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-5">
      <fieldset className="grid grid-cols-1 gap-3 rounded-xl border border-stone-300 bg-white p-4 sm:grid-cols-2">
        <legend className="px-1 font-semibold">Job</legend>
        <label className="flex flex-col gap-1 font-semibold">
          Customer
          <select className={field} {...register("customerId")} {...described("customerId")}>
            <option value="">New customer…</option>
            {customers.map((c) => (
              <option key={c.id} value={c.id}>
                {c.label}
              </option>
            ))}
          </select>
          {err("customerId")}
        </label>
        {!customerId ? (
          <label className="flex flex-col gap-1 font-semibold">
            New customer&apos;s name
            <input className={field} autoComplete="organization" {...register("newCustomerName")} {...described("newCustomerName")} />
            {err("newCustomerName")}
          </label>
        ) : (
          <div />
        )}
        {!customerId ? (
          <fieldset className="grid grid-cols-1 gap-3 rounded-lg border border-dashed border-stone-400 p-3 sm:col-span-2 sm:grid-cols-2" data-testid="new-customer-contact">
            <legend className="px-1 text-sm font-semibold">How to reach the new customer (optional; the report is e-mailed)</legend>
            <label className="flex flex-col gap-1 font-semibold">
              Contact person
              <input className={field} autoComplete="name" {...register("newCustomerContactName")} {...described("newCustomerContactName")} />
              {err("newCustomerContactName")}
            </label>
            <label className="flex flex-col gap-1 font-semibold">
              Customer&apos;s e-mail
              <input type="email" className={field} autoComplete="email" {...register("newCustomerEmail")} {...described("newCustomerEmail")} />
              {err("newCustomerEmail")}
            </label>
            <label className="flex flex-col gap-1 font-semibold">
              Customer&apos;s phone
              <input type="tel" className={field} autoComplete="tel" {...register("newCustomerPhone")} {...described("newCustomerPhone")} />
              {err("newCustomerPhone")}
            </label>
            <label className="flex flex-col gap-1 font-semibold sm:col-span-2">
              Customer&apos;s address
              <textarea rows={2} className={`${field} py-2`} autoComplete="street-address" {...register("newCustomerAddress")} {...described("newCustomerAddress")} />
              {err("newCustomerAddress")}
            </label>
          </fieldset>
        ) : null}
        <label className="flex flex-col gap-1 font-semibold sm:col-span-2">
          Engine
          <input className={field} placeholder="Make, model, size, valves" {...register("engineDescription")} {...described("engineDescription")} />
          {err("engineDescription")}
        </label>
        <label className="flex flex-col gap-1 font-semibold">
          Specifications from the library
          <select className={field} {...register("engineSpecId")}>
            <option value="">None — enter figures with each reading</option>
            {specs.map((s) => (
              <option key={s.id} value={s.id}>
                {s.label}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 font-semibold">
          Promised for
          <input type="date" className={field} {...register("promisedOn")} {...described("promisedOn")} />
          {err("promisedOn")}
        </label>
        <label className="flex flex-col gap-1 font-semibold">
          Technician
          <select className={field} {...register("assignedTechnicianId")} {...described("assignedTechnicianId")}>
            <option value="">Unassigned</option>
            {lappers.map((p) => (
              <option key={p.id} value={p.id}>
                {p.label}
              </option>
            ))}
          </select>
          {err("assignedTechnicianId")}
        </label>
        <label className="flex flex-col gap-1 font-semibold sm:col-span-2">
          Notes
          <textarea rows={3} className={`${field} py-2`} {...register("notes")} />
          {err("notes")}
        </label>
      </fieldset>

      <fieldset className="grid grid-cols-2 gap-3 rounded-xl border border-stone-300 bg-white p-4 sm:grid-cols-3" disabled={layoutLocked}>
        <legend className="px-1 font-semibold">Head layout {layoutLocked ? "(locked: work is recorded against it)" : ""}</legend>
        <label className="col-span-2 flex flex-col gap-1 font-semibold sm:col-span-3">
          Name
          <input className={field} {...register("headLabel")} {...described("headLabel")} />
          {err("headLabel")}
        </label>
        <label className="flex flex-col gap-1 font-semibold">
          Banks
          <select className={field} {...register("arrangement")}>
            <option value="inline">Inline (one bank)</option>
            <option value="v">V (two banks)</option>
          </select>
        </label>
        {(
          [
            ["cylinderCount", "Cylinders"],
            ["intakeValvesPerCylinder", "Intake valves / cyl."],
            ["exhaustValvesPerCylinder", "Exhaust valves / cyl."],
            ["camshaftCount", "Camshafts"],
            ["journalsPerCamshaft", "Journals / camshaft"],
          ] as const
        ).map(([name, label]) => (
          <label key={name} className="flex flex-col gap-1 font-semibold">
            {label}
            <input type="number" inputMode="numeric" className={`${field} figure`} {...register(name)} {...described(name)} />
            {err(name)}
          </label>
        ))}
        <p className="col-span-2 text-sm text-stone-600 sm:col-span-3">Cylinders and journals are numbered from the timing end.</p>
      </fieldset>

      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" disabled={pending} className="min-h-14 rounded-xl bg-ink px-6 text-lg font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : jobId ? "Save job" : "Book in job"}
        </button>
        <p aria-live="polite" className={message?.ok ? "text-emerald-800" : "text-rose-700"} data-testid="job-form-message">
          {message?.text}
        </p>
      </div>
    </form>
  );
}
