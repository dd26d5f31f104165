"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState, useTransition } from "react";
import { useForm } from "react-hook-form";
import { createUser } from "@/lib/actions/users";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { ROLES } from "@/lib/validations/auth";
import { createUserSchema, type CreateUserInput } from "@/lib/validations/users";

const field = "min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base";

export function CreatePersonForm() {
  const [pending, startTransition] = useTransition();
  const [result, setResult] = useState<{ ok: boolean; message: string } | null>(null);
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors },
  } = useForm<CreateUserInput>({
    resolver: zodResolver(createUserSchema),
    defaultValues: { name: "", email: "", role: "technician", password: "" },
  });

  const onSubmit = handleSubmit((values) =>
    startTransition(async () => {
      const state = await createUser(values);
      for (const [key, messages] of Object.entries(state.fieldErrors)) {
        if (key in values) setError(key as keyof CreateUserInput, { message: messages[0] });
      }
      setResult(state.message ? { ok: state.ok, message: state.message } : null);
      if (state.ok) reset();
    }),
  );

  const err = (name: keyof CreateUserInput) =>
    errors[name] ? (
      <p id={`new-${name}-error`} className="text-sm text-rose-700" aria-live="polite">
        {errors[name]?.message}
      </p>
    ) : null;

  return (
    <form onSubmit={onSubmit} noValidate className="grid grid-cols-1 gap-3 sm:grid-cols-2">
      <label className="flex flex-col gap-1 font-semibold">
        Name
        <input className={field} autoComplete="off" aria-describedby="new-name-error" {...register("name")} />
        {err("name")}
      </label>
      <label className="flex flex-col gap-1 font-semibold">
        E-mail
        <input className={field} type="email" autoComplete="off" aria-describedby="new-email-error" {...register("email")} />
        {err("email")}
      </label>
      <label className="flex flex-col gap-1 font-semibold">
        Role
        <select className={field} {...register("role")}>
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1 font-semibold">
        First password
        <input className={field} type="password" autoComplete="new-password" aria-describedby="new-password-hint new-password-error" {...register("password")} />
        <span id="new-password-hint" className="text-sm font-normal text-stone-600">
          At least 10 characters; a short sentence works well. Not a common password, and not the person&apos;s name or e-mail.
        </span>
        {err("password")}
      </label>
      <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Adding…" : "Add person"}
        </button>
        <p aria-live="polite" className={result?.ok ? "text-emerald-800" : "text-rose-700"}>
          {result?.message}
        </p>
      </div>
    </form>
  );
}
