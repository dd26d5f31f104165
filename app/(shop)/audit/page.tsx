import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import { getShopTimeZone } from "@/db/queries/shops";
import { formatWhen } from "@/lib/dates";
import Link from "next/link";
import { getDb } from "@/db/client";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { fieldErrorsOf } from "@/lib/errors";
import { auditFilterOptions, listAuditEntries, type AuditRow } from "@/lib/review/audit-log";
import { auditFilterSchema, type AuditFilter } from "@/lib/review/validation";

export const metadata: Metadata = { title: "Audit trail" };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

/** before/after on one line; long values are cut so a row stays readable on a phone. */
function compact(value: unknown): string {
  if (value === null || value === undefined) return "—";
  const text = JSON.stringify(value);
  return text.length > 240 ? `${text.slice(0, 239)}…` : text;
}

function pageHref(filter: AuditFilter, page: number): string {
  const q = new URLSearchParams();
  if (filter.job) q.set("job", filter.job);
  if (filter.person) q.set("person", filter.person);
  if (filter.from) q.set("from", filter.from);
  if (filter.to) q.set("to", filter.to);
  if (page > 1) q.set("page", String(page));
  const s = q.toString();
  return s ? `/audit?${s}` : "/audit";
}


export default async function AuditPage({ searchParams }: PageProps<"/audit">) {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "jobs:audit")) forbidden();
  const raw = await searchParams;
  const parsed = auditFilterSchema.safeParse({
    job: first(raw.job),
    person: first(raw.person),
    from: first(raw.from),
    to: first(raw.to),
    page: first(raw.page),
  });
  // A bad filter (an edited address) shows its message and the unfiltered trail, not an error page.
  const filter: AuditFilter = parsed.success ? parsed.data : { page: 1 };
  const problems = parsed.success ? [] : Object.values(fieldErrorsOf(parsed.error)).flat();
  const db = await getDb();
  const timeZone = await getShopTimeZone(db, actor.shopId);
  const [options, result] = await Promise.all([auditFilterOptions(db, actor.shopId), listAuditEntries(db, actor.shopId, filter)]);
  const filtered = Boolean(filter.job || filter.person || filter.from || filter.to);

  return (
    <div className="flex flex-col gap-6">
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Audit trail</h1>
        <p className="text-stone-600">
          Every change of state, sign-off, reopening and measurement, newest first. Entries cannot be edited or deleted. Times are UTC.
        </p>
      </div>

      <form method="get" action="/audit" className="grid gap-3 rounded-xl border border-stone-300 bg-white p-4 sm:grid-cols-5" aria-label="Filter the audit trail">
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Job
          <select name="job" defaultValue={filter.job ?? ""} className="min-h-12 rounded-lg border border-stone-400 px-2 font-normal">
            <option value="">All jobs</option>
            {options.jobs.map((j) => (
              <option key={j.id} value={j.id}>
                {j.number}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Person
          <select name="person" defaultValue={filter.person ?? ""} className="min-h-12 rounded-lg border border-stone-400 px-2 font-normal">
            <option value="">Everyone</option>
            {options.people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          From
          <input type="date" name="from" defaultValue={filter.from ?? ""} className="min-h-12 rounded-lg border border-stone-400 px-2 font-normal" />
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          To
          <input type="date" name="to" defaultValue={filter.to ?? ""} className="min-h-12 rounded-lg border border-stone-400 px-2 font-normal" />
        </label>
        <div className="flex items-end gap-2">
          <button type="submit" className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white">
            Filter
          </button>
          {filtered ? (
            <Link href="/audit" className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
              Clear
            </Link>
          ) : null}
        </div>
      </form>

      {problems.length ? (
        <p role="alert" className="rounded-lg border border-rose-300 bg-rose-50 p-3 text-rose-900">
          {problems.join(" ")} Showing the whole trail instead.
        </p>
      ) : null}

      {result.entries.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center text-stone-600" data-testid="audit-empty">
          {filtered ? "No entries match these filters. Widen the dates or choose another job or person." : "Nothing has been recorded yet."}
        </p>
      ) : (
        <ol className="flex flex-col gap-2" data-testid="audit-list">
          {result.entries.map((e) => (
            <AuditItem key={e.id} entry={e} timeZone={timeZone} />
          ))}
        </ol>
      )}

      <nav aria-label="Pages" className="flex items-center justify-between gap-2 text-sm">
        <span>
          {result.total} {result.total === 1 ? "entry" : "entries"} · page {result.page} of {result.pageCount}
        </span>
        <span className="flex gap-2">
          {result.page > 1 ? (
            <Link href={pageHref(filter, result.page - 1)} className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
              Newer
            </Link>
          ) : null}
          {result.page < result.pageCount ? (
            <Link href={pageHref(filter, result.page + 1)} className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
              Older
            </Link>
          ) : null}
        </span>
      </nav>
    </div>
  );
}

function AuditItem({ entry, timeZone }: { entry: AuditRow; timeZone: string }) {
  return (
    <li className="rounded-xl border border-stone-300 bg-white p-3">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <span className="font-semibold">
          {entry.action}{" "}
          <span className="font-normal text-stone-600">
            on {entry.entityType}
            {entry.jobNumber ? ` · ${entry.jobNumber}` : ""}
          </span>
        </span>
        <time dateTime={entry.at} className="text-sm text-stone-600">
          {formatWhen(entry.at, timeZone, { seconds: true })}
        </time>
      </div>
      <p className="text-sm">{entry.actorName ?? "The system"}</p>
      <dl className="mt-1 grid gap-1 text-xs sm:grid-cols-2">
        <div className="min-w-0">
          <dt className="font-semibold">Before</dt>
          <dd className="break-all font-mono">{compact(entry.before)}</dd>
        </div>
        <div className="min-w-0">
          <dt className="font-semibold">After</dt>
          <dd className="break-all font-mono">{compact(entry.after)}</dd>
        </div>
      </dl>
    </li>
  );
}
