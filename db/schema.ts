// The one Grindfade schema. The same tables and migrations run on embedded PGlite and on a
// PostgreSQL server, so only portable pg-core features are used here.
import { sql } from "drizzle-orm";
import {
  type AnyPgColumn,
  bigserial,
  boolean,
  check,
  customType,
  date,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  real,
  text,
  timestamp,
  unique,
  uuid,
} from "drizzle-orm/pg-core";

export const userRole = pgEnum("user_role", ["technician", "supervisor", "admin"]);

// Our own life-cycle names for a work order.
export const jobStatus = pgEnum("job_status", [
  "queued",
  "at_bench",
  "awaiting_audit",
  "signed_off",
  "collected",
]);

export const bankArrangement = pgEnum("bank_arrangement", ["inline", "v"]);
export const valveKind = pgEnum("valve_kind", ["intake", "exhaust"]);

// Our own names for where a seat stands; "stalled" is a seat whose fade curve flattened high.
export const seatState = pgEnum("seat_state", [
  "waiting",
  "lapping",
  "settled",
  "stalled",
  "approved",
  "sent_back",
]);

export const lappingStage = pgEnum("lapping_stage", ["coarse", "fine"]);

// Where a specification value came from: the engine's library entry, an override on the job,
// or typed in with the reading.
export const specSource = pgEnum("spec_source", ["library", "job_override", "entered"]);

// The done-checks besides the sound, recorded per seat at the bench: the contact ring (an even,
// dull-grey band of the right width), a marking-compound contact test, and a solvent leak test of
// the seat's port. Each record is pass or fail; the latest of a kind is the one that counts.
export const seatCheckKind = pgEnum("seat_check_kind", ["contact_ring", "marking_compound", "leak_test"]);
export const seatCheckResult = pgEnum("seat_check_result", ["pass", "fail"]);

export const reviewDecision = pgEnum("review_decision", ["approved", "sent_back", "reopened"]);
export const mailStatus = pgEnum("mail_status", ["queued", "sending", "sent", "failed"]);

export const measurementKind = pgEnum("measurement_kind", [
  "journal_clearance",
  "cap_torque",
  "seat_contact_width",
  "valve_stem_diameter",
  "stem_guide_clearance",
  "installed_spring_height",
  "spring_load",
  "deck_flatness",
]);

/** Raw bytes (PostgreSQL bytea), read and written as a Node Buffer. */
const bytea = customType<{ data: Buffer; driverData: Buffer | Uint8Array }>({
  dataType: () => "bytea",
  toDriver: (value) => value,
  fromDriver: (value) => (Buffer.isBuffer(value) ? value : Buffer.from(value)),
});

const timestamps = {
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
};

export const shops = pgTable("shops", {
  id: uuid("id").primaryKey().defaultRandom(),
  name: text("name").notNull().unique(),
  address: text("address"),
  phone: text("phone"),
  // The IANA time zone every date of the shop is shown in (lib/dates.ts).
  timeZone: text("time_zone").notNull().default("Europe/London"),
  ...timestamps,
});

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    shopId: uuid("shop_id")
      .notNull()
      .references(() => shops.id, { onDelete: "restrict" }),
    email: text("email").notNull(),
    name: text("name").notNull(),
    role: userRole("role").notNull().default("technician"),
    passwordHash: text("password_hash").notNull(),
    active: boolean("active").notNull().default(true),
    failedSignIns: integer("failed_sign_ins").notNull().default(0),
    lockedUntil: timestamp("locked_until", { withTimezone: true }),
    // Carried in every session token; a password reset, a deactivation or "end all sessions" moves
    // it on, and a token with an older one no longer signs anyone in.
    sessionVersion: integer("session_version").notNull().default(0),
    // The last sign-in with the right password; null for someone who never signed in.
    lastSignInAt: timestamp("last_sign_in_at", { withTimezone: true }),
    ...timestamps,
  },
  (t) => [
    unique("users_email_unique").on(t.email),
    check("users_email_lowercase", sql`${t.email} = lower(${t.email})`),
    check("users_failed_sign_ins_range", sql`${t.failedSignIns} >= 0`),
  ],
);

export const customers = pgTable(
  "customers",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    shopId: uuid("shop_id")
      .notNull()
      .references(() => shops.id, { onDelete: "restrict" }),
    name: text("name").notNull(),
    // The person to greet and to call at a business customer; null for a private customer.
    contactName: text("contact_name"),
    email: text("email"),
    phone: text("phone"),
    address: text("address"),
    ...timestamps,
  },
  (t) => [unique("customers_shop_name_unique").on(t.shopId, t.name)],
);

export const jobs = pgTable(
  "jobs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    shopId: uuid("shop_id")
      .notNull()
      .references(() => shops.id, { onDelete: "restrict" }),
    number: text("number").notNull(),
    customerId: uuid("customer_id")
      .notNull()
      .references(() => customers.id, { onDelete: "restrict" }),
    engineDescription: text("engine_description").notNull(),
    status: jobStatus("status").notNull().default("queued"),
    assignedTechnicianId: uuid("assigned_technician_id").references(() => users.id, {
      onDelete: "set null",
    }),
    promisedOn: date("promised_on"),
    notes: text("notes"),
    engineSpecId: uuid("engine_spec_id").references((): AnyPgColumn => engineSpecs.id, { onDelete: "set null" }),
    ...timestamps,
  },
  (t) => [
    unique("jobs_number_unique").on(t.number),
    index("jobs_status_idx").on(t.status),
    index("jobs_technician_idx").on(t.assignedTechnicianId),
  ],
);

export const heads = pgTable(
  "heads",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    jobId: uuid("job_id")
      .notNull()
      .references(() => jobs.id, { onDelete: "cascade" }),
    label: text("label").notNull(),
    arrangement: bankArrangement("arrangement").notNull().default("inline"),
    cylinderCount: integer("cylinder_count").notNull(),
    intakeValvesPerCylinder: integer("intake_valves_per_cylinder").notNull(),
    exhaustValvesPerCylinder: integer("exhaust_valves_per_cylinder").notNull(),
    camshaftCount: integer("camshaft_count").notNull(),
    journalsPerCamshaft: integer("journals_per_camshaft").notNull(),
    ...timestamps,
  },
  (t) => [
    unique("heads_job_label_unique").on(t.jobId, t.label),
    check("heads_cylinder_count_range", sql`${t.cylinderCount} between 1 and 16`),
    check("heads_intake_valves_range", sql`${t.intakeValvesPerCylinder} between 1 and 3`),
    check("heads_exhaust_valves_range", sql`${t.exhaustValvesPerCylinder} between 1 and 3`),
    check("heads_camshaft_count_range", sql`${t.camshaftCount} between 0 and 4`),
    check("heads_journals_range", sql`${t.journalsPerCamshaft} between 0 and 12`),
    check(
      "heads_v_needs_even_cylinders",
      sql`${t.arrangement} = 'inline' or ${t.cylinderCount} % 2 = 0`,
    ),
  ],
);

export const camshafts = pgTable(
  "camshafts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    headId: uuid("head_id")
      .notNull()
      .references(() => heads.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    label: text("label").notNull(),
    journalCount: integer("journal_count").notNull(),
  },
  (t) => [
    unique("camshafts_head_position_unique").on(t.headId, t.position),
    check("camshafts_position_range", sql`${t.position} >= 1`),
    check("camshafts_journal_count_range", sql`${t.journalCount} between 1 and 12`),
  ],
);

export const journals = pgTable(
  "journals",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    camshaftId: uuid("camshaft_id")
      .notNull()
      .references(() => camshafts.id, { onDelete: "cascade" }),
    // Numbered from the timing end, as the caps are marked.
    position: integer("position").notNull(),
  },
  (t) => [
    unique("journals_camshaft_position_unique").on(t.camshaftId, t.position),
    check("journals_position_range", sql`${t.position} >= 1`),
  ],
);

export const seats = pgTable(
  "seats",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    headId: uuid("head_id")
      .notNull()
      .references(() => heads.id, { onDelete: "cascade" }),
    // Cylinder number counted from the timing end.
    cylinder: integer("cylinder").notNull(),
    kind: valveKind("kind").notNull(),
    // 1-based position among this cylinder's valves of the same kind.
    position: integer("position").notNull(),
    state: seatState("state").notNull().default("waiting"),
    ...timestamps,
  },
  (t) => [
    unique("seats_head_position_unique").on(t.headId, t.cylinder, t.kind, t.position),
    check("seats_cylinder_range", sql`${t.cylinder} >= 1`),
    check("seats_position_range", sql`${t.position} between 1 and 3`),
  ],
);

export const valves = pgTable(
  "valves",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    headId: uuid("head_id")
      .notNull()
      .references(() => heads.id, { onDelete: "cascade" }),
    // A valve lives with one seat; null only while it sits on the rack between seats.
    seatId: uuid("seat_id").references(() => seats.id, { onDelete: "set null" }),
    tag: text("tag").notNull(),
    partNumber: text("part_number"),
    serial: text("serial"),
    // Set at the first stroke lapped with this valve in place: from then on it belongs to that
    // seat and no other (a lapped valve goes back into the seat it was lapped in).
    lappedInSeatId: uuid("lapped_in_seat_id").references(() => seats.id, { onDelete: "set null" }),
    ...timestamps,
  },
  (t) => [
    unique("valves_head_tag_unique").on(t.headId, t.tag),
    unique("valves_seat_unique").on(t.seatId),
  ],
);

export const lappingSessions = pgTable(
  "lapping_sessions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    seatId: uuid("seat_id")
      .notNull()
      .references(() => seats.id, { onDelete: "cascade" }),
    stage: lappingStage("stage").notNull(),
    technicianId: uuid("technician_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    sampleRateHz: integer("sample_rate_hz"),
    noiseFloorDb: real("noise_floor_db"),
    // The phone listening to this session; a second phone is told the seat is busy while
    // this one has been heard from recently (lastSeenAt).
    deviceId: text("device_id"),
    lastSeenAt: timestamp("last_seen_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }).notNull().defaultNow(),
    endedAt: timestamp("ended_at", { withTimezone: true }),
    recordingKey: text("recording_key"),
    recordingType: text("recording_type"),
    recordingBytes: integer("recording_bytes"),
  },
  (t) => [
    index("lapping_sessions_seat_idx").on(t.seatId, t.stage),
    check(
      "lapping_sessions_sample_rate_range",
      sql`${t.sampleRateHz} is null or ${t.sampleRateHz} between 8000 and 192000`,
    ),
    check(
      "lapping_sessions_end_after_start",
      sql`${t.endedAt} is null or ${t.endedAt} >= ${t.startedAt}`,
    ),
  ],
);

// Photos of a seat's contact ring (on the valve face and on the seat), taken at the bench. The
// image itself is kept in blob storage under key; the row says whose it is and what it is.
export const seatPhotos = pgTable(
  "seat_photos",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    seatId: uuid("seat_id")
      .notNull()
      .references(() => seats.id, { onDelete: "cascade" }),
    key: text("key").notNull(),
    type: text("type").notNull(),
    bytes: integer("bytes").notNull(),
    takenById: uuid("taken_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("seat_photos_seat_idx").on(t.seatId, t.createdAt),
    unique("seat_photos_key_unique").on(t.key),
    check("seat_photos_bytes_positive", sql`${t.bytes} > 0`),
  ],
);

// One done-check of a seat as recorded at the bench; never changed, a new record supersedes it.
export const seatChecks = pgTable(
  "seat_checks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    seatId: uuid("seat_id")
      .notNull()
      .references(() => seats.id, { onDelete: "cascade" }),
    kind: seatCheckKind("kind").notNull(),
    result: seatCheckResult("result").notNull(),
    // The port the solvent was poured into (the seat's own: intake or exhaust); leak tests only.
    port: valveKind("port"),
    // The contact ring's width as the seat's measurements gave it when the ring was judged (mm).
    contactWidthMm: real("contact_width_mm"),
    measurementId: uuid("measurement_id").references(() => measurements.id, { onDelete: "set null" }),
    note: text("note"),
    photoId: uuid("photo_id").references(() => seatPhotos.id, { onDelete: "set null" }),
    recordedById: uuid("recorded_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    recordedAt: timestamp("recorded_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("seat_checks_seat_idx").on(t.seatId, t.kind, t.recordedAt),
    check("seat_checks_port_for_leak_test", sql`(${t.kind} = 'leak_test') = (${t.port} is not null)`),
    check(
      "seat_checks_width_for_ring",
      sql`${t.contactWidthMm} is null or (${t.kind} = 'contact_ring' and ${t.contactWidthMm} > 0)`,
    ),
    check("seat_checks_note_length", sql`${t.note} is null or length(${t.note}) between 1 and 2000`),
  ],
);

export const strokes = pgTable(
  "strokes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    sessionId: uuid("session_id")
      .notNull()
      .references(() => lappingSessions.id, { onDelete: "cascade" }),
    // Generated on the phone, so a resend of the same stroke is recognised and ignored.
    clientId: uuid("client_id").notNull(),
    index: integer("index").notNull(),
    startS: real("start_s").notNull(),
    endS: real("end_s").notNull(),
    onsetDb: real("onset_db").notNull(),
    bodyDb: real("body_db").notNull(),
    contrastDb: real("contrast_db").notNull(),
    // Grind-band body over the room's grind-band noise, dB; null for strokes from phones that did not send it.
    bandSnrDb: real("band_snr_db"),
    flags: text("flags").array().notNull().default(sql`'{}'::text[]`),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("strokes_session_client_unique").on(t.sessionId, t.clientId),
    index("strokes_session_idx").on(t.sessionId, t.index),
    check("strokes_index_range", sql`${t.index} >= 1`),
    check("strokes_times", sql`${t.startS} >= 0 and ${t.endS} > ${t.startS}`),
    check("strokes_contrast_range", sql`${t.contrastDb} between -60 and 60`),
  ],
);

export const measurements = pgTable(
  "measurements",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    headId: uuid("head_id")
      .notNull()
      .references(() => heads.id, { onDelete: "cascade" }),
    kind: measurementKind("kind").notNull(),
    seatId: uuid("seat_id").references(() => seats.id, { onDelete: "cascade" }),
    journalId: uuid("journal_id").references(() => journals.id, { onDelete: "cascade" }),
    // Stored in SI base units of the kind (mm, N·m, N); the unit entered is kept for display.
    value: real("value").notNull(),
    enteredUnit: text("entered_unit").notNull(),
    specMin: real("spec_min"),
    specMax: real("spec_max"),
    serviceLimit: real("service_limit"),
    method: text("method"),
    // For gauge-strip readings, the strip used; for diameters, the two readings (mm).
    stripId: text("strip_id"),
    boreMm: real("bore_mm"),
    journalMm: real("journal_mm"),
    // A strip reading past the end of its strip's scale: kept as typed, never judged as a clearance.
    offScale: boolean("off_scale").notNull().default(false),
    specSource: specSource("spec_source"),
    note: text("note"),
    recordedById: uuid("recorded_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    ...timestamps,
  },
  (t) => [
    index("measurements_head_idx").on(t.headId, t.kind),
    check("measurements_value_nonnegative", sql`${t.value} >= 0`),
    check(
      "measurements_spec_order",
      sql`${t.specMin} is null or ${t.specMax} is null or ${t.specMin} <= ${t.specMax}`,
    ),
  ],
);

// The specifications library: an engine's figures, saved once and used by every job on it.
export const engineSpecs = pgTable(
  "engine_specs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    shopId: uuid("shop_id")
      .notNull()
      .references(() => shops.id, { onDelete: "restrict" }),
    name: text("name").notNull(),
    source: text("source"),
    // A retired engine is not offered for new jobs; jobs that already use it keep it.
    retiredAt: timestamp("retired_at", { withTimezone: true }),
    ...timestamps,
  },
  (t) => [unique("engine_specs_shop_name_unique").on(t.shopId, t.name)],
);

/** One figure of an engine: a range (min/max), a service limit, or a single nominal value. */
const specColumns = {
  key: text("key").notNull(),
  minValue: real("min_value"),
  maxValue: real("max_value"),
  limitValue: real("limit_value"),
  nominalValue: real("nominal_value"),
  // SI base unit of the key's quantity: "mm", "N·m" or "N". The four values above are in it.
  unit: text("unit").notNull(),
  // The unit the figure was typed in (a manual in inches, a torque in lbf·ft) and the figures as
  // typed, so the library shows them as the manual gives them; null for figures typed in SI before.
  enteredUnit: text("entered_unit"),
  enteredText: jsonb("entered_text").$type<EnteredFigures>(),
  note: text("note"),
};

/** The figures of a spec value as they were typed, in `enteredUnit`. */
export type EnteredFigures = Partial<Record<"min" | "max" | "limit" | "nominal", string>>;

export const specValues = pgTable(
  "spec_values",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    engineSpecId: uuid("engine_spec_id")
      .notNull()
      .references(() => engineSpecs.id, { onDelete: "cascade" }),
    ...specColumns,
    ...timestamps,
  },
  (t) => [
    unique("spec_values_spec_key_unique").on(t.engineSpecId, t.key),
    check("spec_values_order", sql`${t.minValue} is null or ${t.maxValue} is null or ${t.minValue} <= ${t.maxValue}`),
    check("spec_values_unit", sql`${t.unit} in ('mm', 'N·m', 'N')`),
  ],
);

export const jobSpecOverrides = pgTable(
  "job_spec_overrides",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    jobId: uuid("job_id")
      .notNull()
      .references(() => jobs.id, { onDelete: "cascade" }),
    ...specColumns,
    reason: text("reason").notNull(),
    ...timestamps,
  },
  (t) => [
    unique("job_spec_overrides_job_key_unique").on(t.jobId, t.key),
    check("job_spec_overrides_order", sql`${t.minValue} is null or ${t.maxValue} is null or ${t.minValue} <= ${t.maxValue}`),
    check("job_spec_overrides_unit", sql`${t.unit} in ('mm', 'N·m', 'N')`),
  ],
);

// A camshaft's cap torque sheet: the bolt order and the stages, then one tick per bolt and stage.
export const torqueSheets = pgTable(
  "torque_sheets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    headId: uuid("head_id")
      .notNull()
      .references(() => heads.id, { onDelete: "cascade" }),
    camshaftId: uuid("camshaft_id")
      .notNull()
      .references(() => camshafts.id, { onDelete: "cascade" }),
    capCount: integer("cap_count").notNull(),
    boltsPerCap: integer("bolts_per_cap").notNull(),
    boltOrder: text("bolt_order").array().notNull(),
    orderSource: text("order_source").notNull(),
    finalNm: real("final_nm").notNull(),
    stageFractions: real("stage_fractions").array().notNull(),
    specSource: specSource("spec_source").notNull().default("entered"),
    createdById: uuid("created_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    ...timestamps,
  },
  (t) => [
    unique("torque_sheets_camshaft_unique").on(t.camshaftId),
    check("torque_sheets_caps_range", sql`${t.capCount} between 1 and 12`),
    check("torque_sheets_bolts_range", sql`${t.boltsPerCap} between 1 and 2`),
    check("torque_sheets_final_range", sql`${t.finalNm} > 0 and ${t.finalNm} <= 200`),
    check("torque_sheets_order_source", sql`${t.orderSource} in ('centre-out', 'maker')`),
  ],
);

export const torqueTicks = pgTable(
  "torque_ticks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    sheetId: uuid("sheet_id")
      .notNull()
      .references(() => torqueSheets.id, { onDelete: "cascade" }),
    stage: integer("stage").notNull(),
    boltId: text("bolt_id").notNull(),
    tickedById: uuid("ticked_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    tickedAt: timestamp("ticked_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("torque_ticks_sheet_stage_bolt_unique").on(t.sheetId, t.stage, t.boltId),
    check("torque_ticks_stage_range", sql`${t.stage} >= 1`),
  ],
);

// A supervisor's decision on one seat (seatId set) or on the head as a whole (seatId null).
export const reviews = pgTable(
  "reviews",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    jobId: uuid("job_id")
      .notNull()
      .references(() => jobs.id, { onDelete: "cascade" }),
    seatId: uuid("seat_id").references(() => seats.id, { onDelete: "cascade" }),
    decision: reviewDecision("decision").notNull(),
    // Null when a seat was approved without a comment; a send-back or reopening always has one.
    comment: text("comment"),
    // Why a seat was approved without all its done-checks recorded as passed; null otherwise.
    checksReason: text("checks_reason"),
    // A head signed off with parts of its record incomplete: what was incomplete (in words, as the
    // sign-off panel listed it) and the supervisor's reason for signing off anyway; null otherwise.
    incompleteItems: text("incomplete_items").array(),
    incompleteReason: text("incomplete_reason"),
    reviewerId: uuid("reviewer_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("reviews_job_idx").on(t.jobId, t.createdAt),
    check("reviews_comment_length", sql`${t.comment} is null or length(${t.comment}) between 1 and 2000`),
    check("reviews_checks_reason_length", sql`${t.checksReason} is null or length(${t.checksReason}) between 1 and 2000`),
    check(
      "reviews_incomplete_reason_length",
      sql`${t.incompleteReason} is null or length(${t.incompleteReason}) between 1 and 2000`,
    ),
    check("reviews_incomplete_reason_with_items", sql`(${t.incompleteReason} is null) = (${t.incompleteItems} is null)`),
  ],
);

// Mail waiting to go, sent, or given up on; a worker sends and retries from here.
export const mailOutbox = pgTable(
  "mail_outbox",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    jobId: uuid("job_id").references(() => jobs.id, { onDelete: "set null" }),
    kind: text("kind").notNull(),
    recipients: text("recipients").array().notNull(),
    subject: text("subject").notNull(),
    html: text("html").notNull(),
    text: text("text").notNull(),
    status: mailStatus("status").notNull().default("queued"),
    // Every send tried, the one that went out included; never reset.
    attempts: integer("attempts").notNull().default(0),
    // Failed sends since the message was queued or sent again: the back-off and giving up count these.
    failures: integer("failures").notNull().default(0),
    lastError: text("last_error"),
    nextAttemptAt: timestamp("next_attempt_at", { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
    createdById: uuid("created_by_id").references(() => users.id, { onDelete: "set null" }),
    // One file sent with the message (the head report's PDF), kept as it was made so a retry
    // sends the same bytes; null for a message without one.
    attachmentName: text("attachment_name"),
    attachmentType: text("attachment_type"),
    attachment: bytea("attachment"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    check(
      "mail_outbox_attachment_whole",
      sql`(${t.attachment} is null) = (${t.attachmentName} is null) and (${t.attachment} is null) = (${t.attachmentType} is null)`,
    ),
    index("mail_outbox_due_idx").on(t.status, t.nextAttemptAt),
    check("mail_outbox_attempts_range", sql`${t.attempts} >= 0`),
    check("mail_outbox_has_recipients", sql`cardinality(${t.recipients}) >= 1`),
  ],
);

// A link that opens one job's report without an account, sent to the customer at sign-off. Only
// the SHA-256 of its random token is kept; the token itself is in the mail alone.
export const customerLinks = pgTable(
  "customer_links",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    jobId: uuid("job_id")
      .notNull()
      .references(() => jobs.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    revokedById: uuid("revoked_by_id").references(() => users.id, { onDelete: "restrict" }),
    createdById: uuid("created_by_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    unique("customer_links_token_hash_unique").on(t.tokenHash),
    index("customer_links_job_idx").on(t.jobId, t.createdAt),
    check("customer_links_expiry_after_creation", sql`${t.expiresAt} > ${t.createdAt}`),
    check("customer_links_revoked_by", sql`(${t.revokedAt} is null) = (${t.revokedById} is null)`),
  ],
);

// Append-only: a trigger in the migrations refuses UPDATE and DELETE for everyone.
export const auditEntries = pgTable(
  "audit_entries",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "restrict" }),
    action: text("action").notNull(),
    entityType: text("entity_type").notNull(),
    entityId: text("entity_id").notNull(),
    jobId: uuid("job_id").references(() => jobs.id, { onDelete: "restrict" }),
    before: jsonb("before"),
    after: jsonb("after"),
  },
  (t) => [
    index("audit_entries_entity_idx").on(t.entityType, t.entityId),
    index("audit_entries_job_idx").on(t.jobId),
    index("audit_entries_actor_idx").on(t.actorId, t.at),
  ],
);

export type Shop = typeof shops.$inferSelect;
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;
export type Customer = typeof customers.$inferSelect;
export type Job = typeof jobs.$inferSelect;
export type NewJob = typeof jobs.$inferInsert;
export type Head = typeof heads.$inferSelect;
export type NewHead = typeof heads.$inferInsert;
export type Camshaft = typeof camshafts.$inferSelect;
export type Journal = typeof journals.$inferSelect;
export type Seat = typeof seats.$inferSelect;
export type Valve = typeof valves.$inferSelect;
export type LappingSession = typeof lappingSessions.$inferSelect;
export type SeatCheck = typeof seatChecks.$inferSelect;
export type SeatCheckKind = (typeof seatCheckKind.enumValues)[number];
export type SeatCheckResult = (typeof seatCheckResult.enumValues)[number];
export type Stroke = typeof strokes.$inferSelect;
export type NewStroke = typeof strokes.$inferInsert;
export type Measurement = typeof measurements.$inferSelect;
export type AuditEntry = typeof auditEntries.$inferSelect;
export type EngineSpec = typeof engineSpecs.$inferSelect;
export type SpecValue = typeof specValues.$inferSelect;
export type JobSpecOverride = typeof jobSpecOverrides.$inferSelect;
export type TorqueSheet = typeof torqueSheets.$inferSelect;
export type TorqueTick = typeof torqueTicks.$inferSelect;
export type Review = typeof reviews.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type CustomerLink = typeof customerLinks.$inferSelect;
export type UserRole = (typeof userRole.enumValues)[number];
export type JobStatus = (typeof jobStatus.enumValues)[number];
export type SeatState = (typeof seatState.enumValues)[number];
export type LappingStage = (typeof lappingStage.enumValues)[number];
