"use client";

// The shop's own details, as every report prints them at its head.
import { updateShopSettings } from "@/lib/actions/shop";
import { FieldError, fieldClass, ResultMessage, useKeptForm } from "@/components/sheets/form-kit";

export interface ShopSettingsValues {
  name: string;
  address: string | null;
  phone: string | null;
  timeZone: string;
}

export function ShopSettingsForm({ shop, zones }: { shop: ShopSettingsValues; zones: string[] }) {
  const { state, pending, onSubmit, onChange, errorFor, showMessage } = useKeptForm(updateShopSettings);
  const field = (name: "name" | "phone" | "timeZone", label: string, extra: Record<string, string> = {}) => {
    const error = errorFor(name);
    return (
      <label className="flex flex-col gap-1 font-semibold">
        {label}
        <input
          name={name}
          defaultValue={shop[name] ?? ""}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `shop-${name}-err` : undefined}
          className={fieldClass(Boolean(error), "w-full px-3")}
          {...extra}
        />
        <FieldError id={`shop-${name}-err`} message={error} />
      </label>
    );
  };
  const addressError = errorFor("address");
  return (
    <form onSubmit={onSubmit} onChange={onChange} noValidate className="grid grid-cols-1 gap-3 sm:grid-cols-2" data-testid="shop-settings-form">
      {field("name", "Shop name", { autoComplete: "organization" })}
      {field("phone", "Phone", { type: "tel", autoComplete: "tel" })}
      <label className="flex flex-col gap-1 font-semibold sm:col-span-2">
        Address
        <textarea
          name="address"
          rows={3}
          defaultValue={shop.address ?? ""}
          aria-invalid={addressError ? true : undefined}
          aria-describedby={addressError ? "shop-address-err" : undefined}
          className={fieldClass(Boolean(addressError), "w-full px-3 py-2")}
        />
        <FieldError id="shop-address-err" message={addressError} />
      </label>
      {field("timeZone", "Time zone (IANA name)", { list: "shop-time-zones", autoComplete: "off", spellCheck: "false" })}
      <datalist id="shop-time-zones">
        {zones.map((z) => (
          <option key={z} value={z} />
        ))}
      </datalist>
      <p className="self-end text-sm text-stone-600">Every date in the shop is shown in this zone, e.g. Europe/London.</p>
      <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
        <button type="submit" disabled={pending} className="min-h-12 rounded-lg bg-ink px-5 font-semibold text-white disabled:opacity-60">
          {pending ? "Saving…" : "Save shop details"}
        </button>
        <ResultMessage state={state} show={showMessage} testId="shop-settings-message" />
      </div>
    </form>
  );
}
