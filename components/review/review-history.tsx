import type { ReviewRow } from "@/db/queries/reviews";
import { useShopTimeZone } from "@/components/shop-time-zone";
import { formatWhen } from "@/lib/dates";

const DECISION_LABELS: Record<ReviewRow["decision"], string> = {
  approved: "Approved",
  sent_back: "Sent back",
  reopened: "Reopened",
};

const DECISION_STYLES: Record<ReviewRow["decision"], string> = {
  approved: "bg-emerald-100 text-emerald-900",
  sent_back: "bg-amber-100 text-amber-900",
  reopened: "bg-sky-100 text-sky-900",
};

/** The decisions already taken, newest first, as the reviews query returns them. */
export function ReviewHistory({ reviews, emptyText }: { reviews: ReviewRow[]; emptyText: string }) {
  const timeZone = useShopTimeZone();
  if (reviews.length === 0) return <p className="text-sm text-stone-600">{emptyText}</p>;
  return (
    <ol className="flex flex-col gap-2" aria-label="Review history">
      {reviews.map((r) => (
        <li key={r.id} className="rounded-lg border border-stone-200 p-2 text-sm">
          <div className="flex flex-wrap items-baseline gap-2">
            <span className={`rounded-full px-2 py-0.5 font-semibold ${DECISION_STYLES[r.decision]}`}>{DECISION_LABELS[r.decision]}</span>
            <span className="font-semibold">{r.reviewerName}</span>
            <time dateTime={r.createdAt} className="text-stone-600">
              {formatWhen(r.createdAt, timeZone)}
            </time>
          </div>
          {r.comment !== null ? <p className="mt-1 whitespace-pre-wrap">{r.comment}</p> : <p className="mt-1 text-stone-600">No comment.</p>}
          {r.checksReason ? (
            <p className="mt-1 whitespace-pre-wrap rounded bg-amber-50 px-2 py-1 text-amber-950" data-testid="checks-reason">
              <span className="font-semibold">Approved without all done-checks:</span> {r.checksReason}
            </p>
          ) : null}
        </li>
      ))}
    </ol>
  );
}
