import { forbidden } from "next/navigation";
import type { Metadata } from "next";
import Link from "next/link";
import { getDb } from "@/db/client";
import { PrintButton } from "@/components/review/print-button";
import { formatDay, formatWhen } from "@/lib/dates";
import { currentActor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { fieldErrorsOf } from "@/lib/errors";
import { auditFilterOptions, listAuditEntries, shopNames, type AuditRow } from "@/lib/review/audit-log";
import { auditQueryString, auditQueryValues } from "@/lib/review/audit-query";
import { describeEntry, describeGroup, diffEntry, groupBursts, type AuditGroup, type Names, type Part } from "@/lib/review/audit-words";
import { auditFilterSchema, type AuditFilter } from "@/lib/review/validation";

export const metadata: Metadata = { title: "Audit trail" };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v);

// Printed: no navigation, no filter form, every row whole on its page.
const PRINT_CSS = `
@page { size: A4; margin: 14mm 12mm; }
@media print {
  body > div > header { display: none !important; }
  main { max-width: none !important; padding: 0 !important; }
  body { background: white !important; }
  .audit-row { break-inside: avoid; }
  a { color: inherit !important; text-decoration: none !important; }
}
`;

export default async function AuditPage({ searchParams }: PageProps<"/audit">) {
  const actor = await currentActor();
  if (!actor || !can(actor.role, "jobs:audit")) forbidden();
  const raw = await searchParams;
  const parsed = auditFilterSchema.safeParse(auditQueryValues((k) => first(raw[k])));
  // A bad filter (an edited address) shows its message and the unfiltered trail, not an error page.
  const filter: AuditFilter = parsed.success ? parsed.data : {};
  const problems = parsed.success ? [] : Object.values(fieldErrorsOf(parsed.error)).flat();
  const db = await getDb();
  const [options, result, names] = await Promise.all([
    auditFilterOptions(db, actor.shopId),
    listAuditEntries(db, actor.shopId, filter),
    shopNames(db, actor.shopId),
  ]);
  const { timeZone } = result;
  const filtered = Boolean(filter.job || filter.person || filter.from || filter.to);
  const groups = groupBursts(result.entries);
  const jobNumber = filter.job ? options.jobs.find((j) => j.id === filter.job)?.number : undefined;
  const personName = filter.person ? names.get(filter.person) : undefined;
  const heading = [
    jobNumber ? `job ${jobNumber}` : filter.job ? "a job of another shop" : "every job",
    personName ? `by ${personName}` : filter.person ? "by nobody of this shop" : "by everyone",
    filter.from && filter.to
      ? `from ${formatDay(filter.from)} to ${formatDay(filter.to)}`
      : filter.from
        ? `from ${formatDay(filter.from)}`
        : filter.to
          ? `up to ${formatDay(filter.to)}`
          : "all dates",
  ].join(", ");
  const query = auditQueryString(filter);

  return (
    <div className="flex flex-col gap-6 print:gap-3">
      <style>{PRINT_CSS}</style>
      <div>
        <h1 className="text-2xl font-bold tracking-tight">Audit trail</h1>
        <p className="text-stone-600 print:hidden">
          Every change of state, sign-off, reopening and measurement, newest first. Entries cannot be edited or deleted. Times and dates are the
          shop&apos;s ({timeZone}).
        </p>
        <h2 className="mt-1 text-lg font-semibold" data-testid="audit-filters-heading">
          Showing {heading}
        </h2>
        <p className="hidden text-sm print:block">
          Printed {formatWhen(new Date(), timeZone)} · {result.total} {result.total === 1 ? "entry" : "entries"} · times in {timeZone}
        </p>
      </div>

      <form method="get" action="/audit" className="grid gap-3 rounded-xl border border-stone-300 bg-white p-4 sm:grid-cols-5 print:hidden" aria-label="Filter the audit trail">
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

      <div className="flex flex-wrap items-center gap-3 print:hidden">
        <a
          href={`/api/audit/csv${query ? `?${query}` : ""}`}
          download
          className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold"
          data-testid="audit-csv"
        >
          Download CSV
        </a>
        <PrintButton label="Print" />
      </div>

      {problems.length ? (
        <p role="alert" className="rounded-lg border border-rose-300 bg-rose-50 p-3 text-rose-900 print:hidden">
          {problems.join(" ")} Showing the whole trail instead.
        </p>
      ) : null}

      {result.entries.length === 0 ? (
        <p className="rounded-xl border border-dashed border-stone-400 p-6 text-center text-stone-600" data-testid="audit-empty">
          {filtered ? "No entries match these filters. Widen the dates or choose another job or person." : "Nothing has been recorded yet."}
        </p>
      ) : (
        <ol className="flex flex-col gap-2" data-testid="audit-list">
          {groups.map((g) =>
            g.entries.length === 1 ? (
              <AuditItem key={g.entries[0]!.id} entry={g.entries[0]!} timeZone={timeZone} names={names} />
            ) : (
              <AuditBurst key={g.entries[0]!.id} group={g} timeZone={timeZone} names={names} />
            ),
          )}
        </ol>
      )}

      <nav aria-label="Pages" className="flex items-center justify-between gap-2 text-sm print:hidden">
        <span>
          {result.total} {result.total === 1 ? "entry" : "entries"} {filtered ? "match" : "in all"}
          {filter.before ? " · older entries" : ""}
        </span>
        <span className="flex gap-2">
          {filter.before ? (
            <Link href={`/audit${query ? `?${query}` : ""}`} className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold">
              Newest
            </Link>
          ) : null}
          {result.nextBefore ? (
            <Link
              href={`/audit?${auditQueryString(filter, { before: result.nextBefore })}`}
              className="inline-flex min-h-12 items-center rounded-lg border-2 border-ink px-4 font-semibold"
              data-testid="audit-older"
            >
              Older
            </Link>
          ) : null}
        </span>
      </nav>
    </div>
  );
}

function Sentence({ parts }: { parts: Part[] }) {
  return (
    <>
      {parts.map((p, i) =>
        typeof p === "string" ? (
          <span key={i}>{p}</span>
        ) : "job" in p ? (
          <Link key={i} href={`/jobs/${p.job.id}`} className="font-semibold text-brass-dark underline underline-offset-2">
            {p.job.number}
          </Link>
        ) : (
          <Link key={i} href={`/review/${p.seat.id}`} className="font-mono font-semibold text-brass-dark underline underline-offset-2" title="Listen back to this seat">
            {p.seat.code}
          </Link>
        ),
      )}
    </>
  );
}

function Changes({ entry, names }: { entry: AuditRow; names: Names }) {
  const changes = diffEntry(entry, names);
  if (changes.length === 0) return null;
  return (
    <ul className="mt-1 flex flex-col gap-0.5 text-sm text-stone-700" data-testid="audit-changes">
      {changes.map((c) => (
        <li key={c.key} className="break-words">
          <span className="font-semibold">{c.label}:</span> {c.from} → {c.to}
        </li>
      ))}
    </ul>
  );
}

function AuditItem({ entry, timeZone, names }: { entry: AuditRow; timeZone: string; names: Names }) {
  return (
    <li className="audit-row rounded-xl border border-stone-300 bg-white p-3 print:rounded-none print:border-0 print:border-b print:p-1" data-testid="audit-entry" data-action={entry.action}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p>
          <Sentence parts={describeEntry(entry, names)} />
        </p>
        <time dateTime={entry.at} className="text-sm text-stone-600">
          {formatWhen(entry.at, timeZone, { seconds: true })}
        </time>
      </div>
      <Changes entry={entry} names={names} />
    </li>
  );
}

function AuditBurst({ group, timeZone, names }: { group: AuditGroup<AuditRow>; timeZone: string; names: Names }) {
  const newest = group.entries[0]!;
  const oldest = group.entries.at(-1)!;
  return (
    <li className="audit-row rounded-xl border border-stone-300 bg-white p-3 print:rounded-none print:border-0 print:border-b print:p-1" data-testid="audit-burst" data-action={newest.action}>
      <details>
        <summary className="flex min-h-11 cursor-pointer flex-wrap items-baseline justify-between gap-2">
          <span>
            <Sentence parts={describeGroup(group, names)} />{" "}
            <span className="ml-1 text-sm text-stone-600">({group.entries.length} entries — open to see each)</span>
          </span>
          <span className="text-sm text-stone-600">
            <time dateTime={oldest.at}>{formatWhen(oldest.at, timeZone, { seconds: true })}</time>
            {" – "}
            <time dateTime={newest.at}>{formatWhen(newest.at, timeZone, { seconds: true }).replace(/^.*, /, "")}</time>
          </span>
        </summary>
        <ol className="mt-2 flex flex-col gap-2 border-l-2 border-stone-200 pl-3">
          {group.entries.map((e) => (
            <AuditItem key={e.id} entry={e} timeZone={timeZone} names={names} />
          ))}
        </ol>
      </details>
    </li>
  );
}
