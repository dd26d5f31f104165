// The head of the report as a document: the shop that did the work and how to reach it, then
// the job and the customer it was done for.
import type { Customer, Shop } from "@/db/schema";

export function ShopLetterhead({ shop }: { shop: Pick<Shop, "name" | "address" | "phone"> }) {
  return (
    <div className="flex flex-wrap items-end justify-between gap-x-6 gap-y-1 border-b-2 border-ink pb-2" data-testid="report-shop">
      <div>
        <p className="text-xl font-bold tracking-tight" data-testid="report-shop-name">
          {shop.name}
        </p>
        {shop.address ? (
          <p className="whitespace-pre-line text-sm text-stone-700" data-testid="report-shop-address">
            {shop.address}
          </p>
        ) : null}
      </div>
      {shop.phone ? (
        <p className="text-sm" data-testid="report-shop-phone">
          Phone <span className="figure">{shop.phone}</span>
        </p>
      ) : null}
    </div>
  );
}

/** The customer as the report names them: who, who to ask for, and how to reach them. */
export function CustomerBlock({ customer }: { customer: Pick<Customer, "name" | "contactName" | "email" | "phone" | "address"> }) {
  const reach = [customer.phone, customer.email].filter(Boolean).join(" · ");
  return (
    <div className="text-sm" data-testid="report-customer">
      <p className="text-xs font-semibold uppercase tracking-wide text-stone-500">Customer</p>
      <p className="font-semibold">{customer.name}</p>
      {customer.contactName ? <p>Attn. {customer.contactName}</p> : null}
      {customer.address ? <p className="whitespace-pre-line">{customer.address}</p> : null}
      {reach ? <p className="text-stone-700">{reach}</p> : null}
    </div>
  );
}
