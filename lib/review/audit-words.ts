// The audit trail in words: each entry as a sentence ("Rhea Castellan approved seat 4E1 on
// MHW-0143"), its before and after as a short list of changes ("state: Lapping → Settled"), and
// bursts of the same kind of entry read as one line. Pure, for the page, the CSV export and tests.
import { JOB_STATUS_LABELS, SEAT_STATE_LABELS, STAGE_LABELS } from "@/lib/labels";
import { DONE_CHECK_LABELS, DONE_CHECK_RESULT_LABELS } from "@/lib/bench/done-check-words";
import { MEASUREMENT_KINDS, RANGE_VERDICT_LABELS, STEM_GUIDE_METHOD_LABELS } from "@/lib/measure/results";
import { SPEC_KEYS } from "@/lib/specs/keys";
import { ROLE_LABELS } from "@/lib/auth/roles";

/** What the words are made from: an audit row as the trail's read gives it. */
export interface AuditEntryFacts {
  id: number;
  at: string;
  actorId: string | null;
  actorName: string | null;
  action: string;
  entityType: string;
  entityId: string;
  jobId: string | null;
  jobNumber: string | null;
  /** The seat's code when the entry is about a seat (entity type "seat"). */
  seatCode?: string | null;
  before: unknown;
  after: unknown;
}

/** A piece of a sentence: plain text, or a job or seat the page turns into a link. */
export type Part = string | { job: { id: string; number: string } } | { seat: { id: string; code: string; jobId: string | null } };

/** Names of the shop's people by id, for entries that carry an id (a technician, a person changed). */
export type Names = ReadonlyMap<string, string>;

type Obj = Record<string, unknown>;
const obj = (v: unknown): Obj => (v && typeof v === "object" && !Array.isArray(v) ? (v as Obj) : {});
const str = (v: unknown): string | null => (typeof v === "string" && v.trim() ? v : typeof v === "number" ? String(v) : null);

interface Ctx {
  e: AuditEntryFacts;
  who: string;
  before: Obj;
  after: Obj;
  names: Names;
  /** The job as a link, or "a job" when the entry has none. */
  job: Part;
  /** The seat as a link when the entry names one, else its code from the payload, else "a seat". */
  seat: Part;
  /** The person the entry is about (entity type "user"). */
  person: string;
}

type Words = (c: Ctx) => Part[];

const statusWord = (v: unknown) => (typeof v === "string" && v in JOB_STATUS_LABELS ? JOB_STATUS_LABELS[v as keyof typeof JOB_STATUS_LABELS] : plainWords(String(v ?? "")));
const stateWord = (v: unknown) => (typeof v === "string" && v in SEAT_STATE_LABELS ? SEAT_STATE_LABELS[v as keyof typeof SEAT_STATE_LABELS] : plainWords(String(v ?? "")));

function measurementPhrase(after: Obj): string {
  const kind = str(after.kind);
  if (kind === "journal_clearance") {
    const journal = str(after.journal);
    const value = typeof after.valueMm === "number" ? ` ${formatNumber(after.valueMm)} mm` : "";
    return `${journal ? `journal ${journal} ` : ""}clearance${value}`;
  }
  const info = kind && kind in MEASUREMENT_KINDS ? MEASUREMENT_KINDS[kind as keyof typeof MEASUREMENT_KINDS] : null;
  const label = info ? info.label.charAt(0).toLowerCase() + info.label.slice(1) : kind ? plainWords(kind) : "a measurement";
  const value = typeof after.valueSi === "number" ? ` ${formatNumber(after.valueSi)} ${info?.quantity === "force" ? "N" : "mm"}` : "";
  return `${label}${value}`;
}

/**
 * The words for every action the app writes. A new action written anywhere in lib/ or db/seed.ts
 * needs its words here (tests/review/audit-words.test.ts reads the sources and fails otherwise).
 */
export const AUDIT_WORDS: Readonly<Record<string, Words>> = {
  "job.created": (c) => [`${c.who} booked in `, c.job, ...(str(c.after.engine) ? [` (${c.after.engine})`] : [])],
  "job.edited": (c) => [`${c.who} edited the details of `, c.job],
  "job.status_changed": (c) =>
    c.after.status === "awaiting_audit"
      ? [`${c.who} handed in `, c.job, " for audit"]
      : str(c.after.status)
        ? [`${c.who} moved `, c.job, ` to ${statusWord(c.after.status)}`]
        : [`${c.who} changed the status of `, c.job],
  "job.taken_back": (c) => [`${c.who} took `, c.job, " back to the bench before its audit"],
  "job.back_to_bench": (c) => [`${c.who} put `, c.job, ` back at the bench${str(c.after.work) ? ` (${c.after.work})` : ""}`],
  "job.signed_off": (c) => [`${c.who} signed off `, c.job],
  "job.sent_back": (c) => [`${c.who} sent `, c.job, " back to the bench"],
  "job.reopened": (c) => [`${c.who} reopened `, c.job],
  "seat.approved": (c) => [`${c.who} approved seat `, c.seat, " on ", c.job],
  "seat.sent_back": (c) => [`${c.who} sent back seat `, c.seat, " on ", c.job],
  "seat.reopened": (c) => [`${c.who} reopened seat `, c.seat, " on ", c.job],
  "seat.state_changed": (c) =>
    c.after.state === "lapping"
      ? [`${c.who} started lapping seat `, c.seat, " on ", c.job]
      : str(c.after.state)
        ? [`Seat `, c.seat, " on ", c.job, ` became ${stateWord(c.after.state)} as ${c.who} lapped it`]
        : [`Seat `, c.seat, " on ", c.job, ` changed state as ${c.who} lapped it`],
  "seat.photo_added": (c) => [`${c.who} added a photo of seat `, c.seat, " on ", c.job],
  "seat.check_recorded": (c) => {
    const kind = str(c.after.kind);
    const label = kind && kind in DONE_CHECK_LABELS ? DONE_CHECK_LABELS[kind as keyof typeof DONE_CHECK_LABELS].toLowerCase() : "done-check";
    const result = str(c.after.result);
    const said = result && result in DONE_CHECK_RESULT_LABELS ? `: ${DONE_CHECK_RESULT_LABELS[result as keyof typeof DONE_CHECK_RESULT_LABELS].toLowerCase()}` : "";
    return [`${c.who} recorded a ${label} on seat `, c.seat, " of ", c.job, said];
  },
  "session.started": (c) => {
    const stage = str(c.after.stage);
    const stageWords = stage && stage in STAGE_LABELS ? ` with ${STAGE_LABELS[stage as keyof typeof STAGE_LABELS].toLowerCase()}` : "";
    return [`${c.who} started lapping seat `, c.seat, ` on `, c.job, stageWords];
  },
  "session.ended": (c) => [`${c.who} ended a lapping session on `, c.job],
  "measurement.recorded": (c) => [`${c.who} saved ${measurementPhrase(c.after)} on `, c.job],
  "measurement.edited": (c) => [`${c.who} changed ${measurementPhrase(c.after)} on `, c.job],
  "torque_sheet.set_up": (c) => [`${c.who} set up a cap torque sheet on `, c.job],
  "torque_sheet.changed": (c) => [`${c.who} changed the cap torque sheet on `, c.job],
  "torque.ticked": (c) => [
    `${c.who} ticked ${named("bolt", c.after.bolt)}${opt(" at stage", c.after.stage)}${typeof c.after.nm === "number" ? ` (${formatNumber(c.after.nm)} N·m)` : ""} on `,
    c.job,
  ],
  "torque.tick_undone": (c) => [`${c.who} undid the tick of ${named("bolt", c.before.bolt)}${opt(" at stage", c.before.stage)} on `, c.job],
  "valve.identified": (c) => [`${c.who} updated the tag and numbers of ${named("valve", c.after.tag ?? c.before.tag)} on `, c.job],
  "valve.moved": (c) => [`${c.who} moved ${named("valve", c.after.valve)} into ${named("seat", c.after.seat)} on `, c.job],
  "valve.swapped": (c) => [
    `${c.who} swapped ${named("valve", c.after.valve)} with ${str(c.after.swappedWith) ?? "another valve"} into ${named("seat", c.after.seat)} on `,
    c.job,
  ],
  "spec.created": (c) => [`${c.who} added ${named("engine", c.after.name)} to the specifications library`],
  "spec.figure_saved": (c) => [`${c.who} saved ${specKeyWords(c.after.key)} in the specifications library`],
  "spec.job_override": (c) => [`${c.who} set this job's own ${specKeyWords(c.after.key)} on `, c.job],
  "spec.renamed": (c) => [`${c.who} renamed ${named("engine", c.before.name)}${opt(" to", c.after.name)}`],
  "spec.retired": (c) => [`${c.who} retired ${named("engine", c.before.name ?? c.after.name)}`],
  "spec.reinstated": (c) => [`${c.who} brought back ${named("engine", c.before.name ?? c.after.name)} for new jobs`],
  "user.created": (c) => [`${c.who} added ${str(c.after.name) ?? "a person"}${str(c.after.role) ? ` as ${roleWord(c.after.role).toLowerCase()}` : ""}`],
  "user.password_reset": (c) => [`${c.who} reset the password of ${c.person}`],
  "user.role_changed": (c) =>
    str(c.after.role)
      ? [`${c.who} made ${c.person} ${article(roleWord(c.after.role))} ${roleWord(c.after.role).toLowerCase()}`]
      : [`${c.who} changed the role of ${c.person}`],
  "user.deactivated": (c) => [`${c.who} deactivated ${c.person}`],
  "user.reactivated": (c) => [`${c.who} reactivated ${c.person}`],
  "user.sessions_ended": (c) => [`${c.who} signed ${c.person} out everywhere`],
  "person.deactivated": (c) => [`${c.who} deactivated ${c.person}`],
  "person.reactivated": (c) => [`${c.who} reactivated ${c.person}`],
  "mail.retried": (c) => [`${c.who} asked for a message to be sent again`],
  "customer_link.created": (c) => [`${c.who} made a report link for the customer of `, c.job],
  "customer_link.opened": (c) => [`${c.who} opened the customer's report link for `, c.job],
  "customer_link.revoked": (c) => [`${c.who} revoked the customer's report link for `, c.job],
  "customer_link.refused": (c) => [`${c.who} tried a customer's report link that was ${c.after.why === "revoked" ? "revoked" : "out of date"}, for `, c.job],
  "customer.created": (c) => [`${c.who} added ${named("customer", c.after.name)}`],
  "customer.updated": (c) => [`${c.who} updated the details of ${named("customer", c.after.name ?? c.before.name)}`],
  "shop.updated": (c) => [`${c.who} updated the shop's details`],
};

/** "valve 2I2" when the payload names it, else "a valve". */
function named(what: string, v: unknown): string {
  const s = str(v);
  return s ? `${what} ${s}` : `${article(what)} ${what}`;
}
/** " at stage 2" when the payload has it, else nothing. */
function opt(prefix: string, v: unknown): string {
  const s = str(v);
  return s ? `${prefix} ${s}` : "";
}

function article(word: string): string {
  return /^[aeiou]/i.test(word) ? "an" : "a";
}
function roleWord(v: unknown): string {
  return typeof v === "string" && v in ROLE_LABELS ? ROLE_LABELS[v as keyof typeof ROLE_LABELS] : plainWords(String(v ?? "another role"));
}
function specKeyWords(v: unknown): string {
  if (typeof v === "string" && v in SPEC_KEYS) {
    const label = SPEC_KEYS[v as keyof typeof SPEC_KEYS].label;
    return `figures for ${label.charAt(0).toLowerCase() + label.slice(1)}`;
  }
  return typeof v === "string" ? `figures for ${plainWords(v)}` : "figures";
}

/** "customer_link" → "customer link", "valueMm" → "value mm". */
export function plainWords(code: string): string {
  return code
    .replace(/([a-z0-9])([A-Z])/g, "$1 $2")
    .replace(/[_\-.]+/g, " ")
    .trim()
    .toLowerCase();
}

/**
 * The sentence for an action nobody gave words yet: "Rhea Castellan: customer link revoked,
 * MHW-0143". Readable, and never the payload.
 */
function fallback(c: Ctx): Part[] {
  const [entity, ...rest] = c.e.action.split(".");
  const verb = rest.join(" ");
  const what = plainWords(entity ?? c.e.entityType) || "entry";
  const did = verb ? plainWords(verb) : "recorded";
  const parts: Part[] = [`${c.who}: ${what} ${did}`];
  if (c.e.entityType === "seat" && c.e.seatCode) parts.push(", seat ", c.seat);
  if (c.e.jobId && c.e.jobNumber) parts.push(c.e.entityType === "seat" && c.e.seatCode ? " on " : ", ", c.job);
  return parts;
}

export function hasWords(action: string): boolean {
  return Object.hasOwn(AUDIT_WORDS, action);
}

function contextOf(e: AuditEntryFacts, names: Names): Ctx {
  const before = obj(e.before);
  const after = obj(e.after);
  const seatCode = e.seatCode ?? str(after.seat) ?? str(before.seat);
  const job: Part = e.jobId && e.jobNumber ? { job: { id: e.jobId, number: e.jobNumber } } : "a job";
  const seat: Part = seatCode
    ? e.entityType === "seat"
      ? { seat: { id: e.entityId, code: seatCode, jobId: e.jobId } }
      : seatCode
    : // A seat removed with its head's old layout: its entries keep their words.
      "(code no longer on the head)";
  const person = (e.entityType === "user" && names.get(e.entityId)) || str(after.name) || "a person";
  return { e, who: e.actorName ?? "Someone", before, after, names, job, seat, person };
}

/** The entry as a sentence, in parts (jobs and seats as links). */
export function describeEntry(e: AuditEntryFacts, names: Names = new Map()): Part[] {
  const c = contextOf(e, names);
  const words = AUDIT_WORDS[e.action];
  if (words) {
    try {
      return words(c);
    } catch {
      // A payload shaped other than expected reads in the plain form rather than breaking the page.
    }
  }
  return fallback(c);
}

export function partsText(parts: Part[]): string {
  return parts.map((p) => (typeof p === "string" ? p : "job" in p ? p.job.number : p.seat.code)).join("");
}

/** The entry as one line of plain text. */
export function entryText(e: AuditEntryFacts, names: Names = new Map()): string {
  return partsText(describeEntry(e, names));
}

// ------------------------------------------------------------------ before and after

const KEY_LABELS: Record<string, string> = {
  status: "status",
  state: "state",
  comment: "comment",
  reason: "reason",
  checksReason: "why done-checks are missing",
  checksShortfall: "done-checks missing",
  valueMm: "value",
  valueSi: "value",
  method: "method",
  verdict: "verdict",
  offScale: "off the strip's scale",
  stage: "stage",
  strokes: "strokes",
  finalNm: "final torque",
  nm: "torque",
  capCount: "caps",
  boltsPerCap: "bolts per cap",
  order: "bolt order",
  stageFractions: "stages",
  specSource: "figure from",
  tag: "tag",
  partNumber: "part number",
  serial: "serial number",
  seat: "seat",
  valve: "valve",
  swappedWith: "swapped with",
  role: "role",
  active: "can sign in",
  engine: "engine",
  technician: "technician",
  promisedOn: "promised for",
  layoutChanged: "layout changed",
  unfinished: "unfinished",
  work: "work",
  contactWidthMm: "contact width",
  result: "result",
  port: "port",
  note: "note",
  type: "file type",
  bytes: "size",
  name: "name",
  email: "e-mail",
  min: "minimum",
  max: "maximum",
  limit: "service limit",
  nominal: "nominal",
  minValue: "minimum",
  maxValue: "maximum",
  limitValue: "service limit",
  nominalValue: "nominal",
  unit: "unit",
  key: "figure",
  bolt: "bolt",
  kind: "kind",
  journal: "journal",
  camshaft: "camshaft",
  enteredUnit: "entered in",
  source: "source",
  number: "number",
  layout: "layout",
};

/** Keys that only repeat what the sentence says, or are ids nobody reads. */
const HIDDEN_KEYS = new Set(["seat", "kind", "camshaft", "journal", "key", "bolt", "number", "source", "tickedAt", "sheetId", "checkId", "photoId"]);

const METHOD_WORDS: Record<string, string> = {
  strip: "gauge strip",
  diameters: "bore minus journal diameter",
  ...Object.fromEntries(Object.entries(STEM_GUIDE_METHOD_LABELS).map(([k, v]) => [k, v.toLowerCase()])),
};
const SPEC_SOURCE_WORDS: Record<string, string> = { library: "the specifications library", job_override: "this job's own figure", entered: "entered on the sheet" };

export function formatNumber(n: number): string {
  if (!Number.isFinite(n)) return String(n);
  return String(Number(n.toPrecision(6)));
}

function shortText(s: string, max = 80): string {
  return s.length > max ? `${s.slice(0, max - 1)}…` : s;
}

/** One value in words, with its unit where the key says which. */
export function valueWords(key: string, value: unknown, names: Names = new Map(), unitHint?: string): string {
  if (value === null || value === undefined || value === "") return "—";
  if (typeof value === "boolean") return value ? "yes" : "no";
  if (typeof value === "number") {
    if (key === "bytes") return value >= 1024 * 1024 ? `${formatNumber(value / (1024 * 1024))} MB` : `${Math.round(value / 1024)} kB`;
    if (key.endsWith("Mm")) return `${formatNumber(value)} mm`;
    if (key === "nm" || key.endsWith("Nm")) return `${formatNumber(value)} N·m`;
    if (key === "valueSi" || ["min", "max", "limit", "nominal", "minValue", "maxValue", "limitValue", "nominalValue"].includes(key))
      return unitHint ? `${formatNumber(value)} ${unitHint}` : formatNumber(value);
    return formatNumber(value);
  }
  if (typeof value === "string") {
    if (key === "status") return statusWord(value);
    if (key === "state") return stateWord(value);
    if (key === "role") return roleWord(value);
    if (key === "verdict") return value in RANGE_VERDICT_LABELS ? RANGE_VERDICT_LABELS[value as keyof typeof RANGE_VERDICT_LABELS] : plainWords(value);
    if (key === "method") return METHOD_WORDS[value] ?? plainWords(value);
    if (key === "specSource") return SPEC_SOURCE_WORDS[value] ?? plainWords(value);
    if (key === "stage" && value in STAGE_LABELS) return STAGE_LABELS[value as keyof typeof STAGE_LABELS].toLowerCase();
    if (key === "technician" || key.endsWith("ById")) return names.get(value) ?? "someone else";
    if (key === "result" && value in DONE_CHECK_RESULT_LABELS) return DONE_CHECK_RESULT_LABELS[value as keyof typeof DONE_CHECK_RESULT_LABELS].toLowerCase();
    if (["comment", "reason", "checksReason", "note", "work"].includes(key)) return `'${shortText(value)}'`;
    return shortText(value);
  }
  if (key === "stageFractions" && Array.isArray(value) && value.every((v) => typeof v === "number")) {
    return value.map((v) => `${formatNumber(v * 100)} %`).join(", ");
  }
  if (Array.isArray(value)) {
    if (value.every((v) => typeof v === "number")) return shortText(value.map((v) => formatNumber(v)).join(", "));
    return shortText(value.map((v) => (typeof v === "string" ? v : typeof v === "number" ? formatNumber(v) : plainWords(Object.keys(obj(v)).join(" ")))).join(", "));
  }
  // A nested object (what was unfinished at hand-in): its parts by name, never JSON.
  const inner = Object.entries(obj(value)).filter(([, v]) => v !== null && v !== undefined && !(Array.isArray(v) && v.length === 0));
  if (inner.length === 0) return "—";
  return shortText(inner.map(([k, v]) => `${KEY_LABELS[k] ?? plainWords(k)} ${Array.isArray(v) ? v.join(", ") : typeof v === "object" ? "…" : String(v)}`).join("; "));
}

export interface Change {
  key: string;
  label: string;
  from: string;
  to: string;
}

const same = (a: unknown, b: unknown) => JSON.stringify(a ?? null) === JSON.stringify(b ?? null);

/**
 * Before and after as a short list of changes, in words: "comment: — → 'Seat face looks even'",
 * "state: Lapping → Settled". Keys the sentence already says and ids are left out; a value that
 * did not change is not listed.
 */
export function diffEntry(e: Pick<AuditEntryFacts, "before" | "after">, names: Names = new Map()): Change[] {
  const before = obj(e.before);
  const after = obj(e.after);
  const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])];
  const specKey = typeof after.key === "string" && after.key in SPEC_KEYS ? SPEC_KEYS[after.key as keyof typeof SPEC_KEYS] : null;
  const unit = typeof after.unit === "string" ? after.unit : (specKey?.unit ?? measurementUnit(after.kind));
  const out: Change[] = [];
  for (const key of keys) {
    if (HIDDEN_KEYS.has(key) || /(^id$|Id$)/.test(key) && key !== "tickedById") continue;
    if (key === "unit") continue;
    const from = before[key];
    const to = after[key];
    if (same(from, to)) continue;
    if ((from === null || from === undefined) && (to === null || to === undefined)) continue;
    out.push({ key, label: KEY_LABELS[key] ?? plainWords(key), from: valueWords(key, from, names, unit), to: valueWords(key, to, names, unit) });
  }
  return out;
}

function measurementUnit(kind: unknown): string | undefined {
  if (typeof kind !== "string" || !(kind in MEASUREMENT_KINDS)) return undefined;
  return MEASUREMENT_KINDS[kind as keyof typeof MEASUREMENT_KINDS].quantity === "force" ? "N" : "mm";
}

export function changeText(c: Change): string {
  return `${c.label}: ${c.from} → ${c.to}`;
}

// ------------------------------------------------------------------ bursts

/** Entries closer than this, same actor, same action, same job, read as one line. */
export const BURST_GAP_MS = 60_000;

export interface AuditGroup<T extends AuditEntryFacts = AuditEntryFacts> {
  /** The entries, newest first as the trail lists them. */
  entries: T[];
}

/**
 * Consecutive entries (as listed, newest first) of the same actor and the same action on the same
 * job, each within a minute of the one before it, as one group. Anything else between them, or a
 * gap of more than a minute, starts a new group.
 */
export function groupBursts<T extends AuditEntryFacts>(entries: readonly T[]): AuditGroup<T>[] {
  const groups: AuditGroup<T>[] = [];
  for (const e of entries) {
    const last = groups.at(-1);
    const prev = last?.entries.at(-1);
    if (
      last &&
      prev &&
      prev.actorId === e.actorId &&
      prev.action === e.action &&
      prev.jobId === e.jobId &&
      Math.abs(Date.parse(prev.at) - Date.parse(e.at)) <= BURST_GAP_MS
    ) {
      last.entries.push(e);
    } else {
      groups.push({ entries: [e] });
    }
  }
  return groups;
}

/** Plural sentences for bursts of the actions that come in bursts; others read "… 8 times". */
const BURST_WORDS: Record<string, (who: string, n: number) => string> = {
  "seat.approved": (who, n) => `${who} approved ${n} seats on `,
  "seat.sent_back": (who, n) => `${who} sent back ${n} seats on `,
  "seat.reopened": (who, n) => `${who} reopened ${n} seats on `,
  "seat.check_recorded": (who, n) => `${who} recorded ${n} done-checks on `,
  "seat.photo_added": (who, n) => `${who} added ${n} seat photos on `,
  "seat.state_changed": (who, n) => `${n} seats changed state as ${who} lapped on `,
  "session.started": (who, n) => `${who} started ${n} lapping sessions on `,
  "measurement.recorded": (who, n) => `${who} saved ${n} measurements on `,
  "measurement.edited": (who, n) => `${who} changed ${n} measurements on `,
  "torque.ticked": (who, n) => `${who} ticked ${n} bolts on `,
  "valve.identified": (who, n) => `${who} updated the tags and numbers of ${n} valves on `,
  "valve.moved": (who, n) => `${who} moved ${n} valves on `,
  "valve.swapped": (who, n) => `${who} swapped ${n} valves on `,
};

/** The one line a burst reads as: "Rhea Castellan approved 8 seats on MHW-0144". */
export function describeGroup(g: AuditGroup, names: Names = new Map()): Part[] {
  const first = g.entries[0]!;
  if (g.entries.length === 1) return describeEntry(first, names);
  const who = first.actorName ?? "Someone";
  const n = g.entries.length;
  const job: Part = first.jobId && first.jobNumber ? { job: { id: first.jobId, number: first.jobNumber } } : "a job";
  const words = BURST_WORDS[first.action];
  if (words) return [words(who, n), job];
  const one = describeEntry(first, names);
  return [...one, ` — ${n} entries like this`];
}
