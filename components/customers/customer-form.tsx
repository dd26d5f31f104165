"use client";

// A customer's name and how to reach them: adds one, or edits one. Keeps what was typed when the
// server refuses, with each refused field's own message.
import { useEffect, useRef } from "react";
import { createCustomer, updateCustomer } from "@/lib/actions/customers";
import { FieldError, fieldClass, ResultMessage, useKeptForm } from "@/components/sheets/form-kit";
import type { Customer } from "@/db/schema";

type Values = Pick<Customer, "name" | "contactName" | "email" | "phone" | "address">;

const FIELDS = [
  { name: "name", label: "Name", hint: "A business or a person", type: "text", autoComplete: "organization" },
  { name: "contactName", label: "Contact person (optional)", hint: "Who to greet and call at a business", type: "text", autoComplete: "name" },
  { name: "email", label: "E-mail (optional)", hint: "Where the report is sent", type: "email", autoComplete: "email" },
  { name: "phone", label: "Phone (optional)", hint: undefined, type: "tel", autoComplete: "tel" },
] as const;

export function CustomerForm({ customer }: { customer?: Values & { id: string } }) {
  const editing = Boolean(customer);
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(editing ? updateCustomer : createCustomer);
  const formRef = useRef<HTMLFormElement>(null);
  // A customer added: the form is cleared for the next one (an edit keeps what it saved).
  useEffect(() => {
    if (!editing && state.ok) formRef.current?.reset();
  }, [editing, state]);
  const idBase = editing ? `customer-${customer!.id}` : "new-customer";
  return (
    <form ref={formRef} onSubmit={onSubmit} onChange={onChange} noValidate className="grid grid-cols-1 gap-3 sm:grid-cols-2" data-testid={editing ? "customer-edit-form" : "customer-create-form"}>
      {customer ? <input type="hidden" name="id" value={customer.id} /> : null}
      {FIELDS.map((f) => {
        const error = errorFor(f.name);
        return (
          <label key={f.name} className="flex flex-col gap-1 font-semibold">
            {f.label}
            <input
              name={f.name}
              type={f.type}
              autoComplete={f.autoComplete}
              defaultValue={customer?.[f.name] ?? ""}
              aria-invalid={error ? true : undefined}
              aria-describedby={error ? `${idBase}-${f.name}-err` : undefined}
              className={fieldClass(Boolean(error), "w-full px-3")}
            />
            {f.hint && !error ? <span className="text-xs font-normal text-stone-600">{f.hint}</span> : null}
            <FieldError id={`${idBase}-${f.name}-err`} message={error} />
          </label>
        );
      })}
      <label className="flex flex-col gap-1 font-semibold sm:col-span-2">
        Address (optional)
        <textarea
          name="address"
          rows={3}
          autoComplete="street-address"
          defaultValue={customer?.address ?? ""}
          aria-invalid={errorFor("address") ? true : undefined}
          aria-describedby={errorFor("address") ? `${idBase}-address-err` : undefined}
          className={fieldClass(Boolean(errorFor("address")), "w-full px-3 py-2")}
        />
        <FieldError id={`${idBase}-address-err`} message={errorFor("address")} />
      </label>
      <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : editing ? "Save customer" : "Add customer"}
        </button>
        <ResultMessage state={state} show={showMessage} testId="customer-form-message" />
      </div>
    </form>
  );
}
