"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm } from "react-hook-form";
import { signInErrorMessage } from "@/lib/auth/sign-in-errors";
import { signInSchema, type SignInInput } from "@/lib/validations/auth";

export function SignInForm({ callbackUrl, initialError }: { callbackUrl: string; initialError: string | null }) {
  const router = useRouter();
  const [formError, setFormError] = useState<string | null>(initialError);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: "", password: "" } });

  const onSubmit = handleSubmit(async (values) => {
    setFormError(null);
    try {
      const result = await signIn("credentials", { ...values, redirect: false });
      if (!result || result.error) {
        setFormError(signInErrorMessage(result?.error ?? "invalid"));
        return;
      }
      router.replace(callbackUrl);
      router.refresh();
    } catch {
      setFormError("The server could not be reached. Check the connection and try again.");
    }
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <div className="flex flex-col gap-1">
        <label htmlFor="email" className="font-semibold">
          E-mail
        </label>
        <input
          id="email"
          type="email"
          autoComplete="username"
          inputMode="email"
          aria-invalid={errors.email ? true : undefined}
          aria-describedby={errors.email ? "email-error" : undefined}
          className="min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base"
          {...register("email")}
        />
        {errors.email ? (
          <p id="email-error" className="text-sm text-rose-700" aria-live="polite">
            {errors.email.message}
          </p>
        ) : null}
      </div>
      <div className="flex flex-col gap-1">
        <label htmlFor="password" className="font-semibold">
          Password
        </label>
        <input
          id="password"
          type="password"
          autoComplete="current-password"
          aria-invalid={errors.password ? true : undefined}
          aria-describedby={errors.password ? "password-error" : undefined}
          className="min-h-12 rounded-lg border border-stone-400 bg-white px-3 text-base"
          {...register("password")}
        />
        {errors.password ? (
          <p id="password-error" className="text-sm text-rose-700" aria-live="polite">
            {errors.password.message}
          </p>
        ) : null}
      </div>
      <div aria-live="assertive" role="status">
        {formError ? (
          <p className="rounded-lg border border-rose-300 bg-rose-50 p-3 text-sm font-medium text-rose-900" data-testid="sign-in-error">
            {formError}
          </p>
        ) : null}
      </div>
      <button
        type="submit"
        disabled={isSubmitting}
        className="min-h-14 rounded-xl bg-ink text-lg font-semibold text-white disabled:opacity-60"
      >
        {isSubmitting ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
