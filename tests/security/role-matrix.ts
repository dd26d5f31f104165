// The role matrix: for every page, every route handler method and every server action of the
// app, what each kind of caller gets. tests/security/matrix-coverage.test.ts holds it against the
// route tree on disk (a new route without a row fails there); tests/e2e/role-matrix.test.ts
// checks the pages and route handlers over HTTP against a production build, and
// tests/security/action-matrix.test.ts calls every server action in-process.
//
// The policy it writes down (lib/auth/roles.ts, lib/auth/job-access.ts, lib/review/service.ts):
// - every signed-in role of the shop may read every job, seat, sheet, photo and recording;
// - recording work (sessions, strokes, recordings, photos, sheets, valves) needs "jobs:work"
//   (technicians and supervisors) and, for a technician, a job assigned to them or to nobody;
// - booking in and editing jobs, and the specifications library: supervisors and admins;
// - sign-off, send-back and reopening: supervisors only (admins read the audit trail, they do
//   not judge lapping work);
// - customers (their contact details and editing them): supervisors and admins;
// - people, the shop's own details and the mail outbox: admins only;
// - nothing crosses shops: another shop's id answers like one that does not exist.

/**
 * Who calls. For records tied to a job each persona works on one demo job (db/seed.ts):
 * - anonymous: no session, on MHW-0141's records;
 * - technicianOwnJob: Ines, on MHW-0141 (assigned to her), its head, seats, sessions, photos;
 * - technicianOtherJob: Ines, on MHW-0142 (assigned to Dov) and its records;
 * - supervisor: Rhea, on MHW-0142 (assigned to Dov, not to her);
 * - admin: the shop's admin, on MHW-0141.
 * For what belongs to no job (people, outbox, specifications, audit, the jobs list, health,
 * sign-in) the two technician personas are the same person and get the same answer.
 */
export const PERSONAS = [
  "anonymous",
  "technicianOwnJob",
  "technicianOtherJob",
  "supervisor",
  "admin",
] as const;
export type Persona = (typeof PERSONAS)[number];

/** Which demo job a persona's job-tied records belong to. */
export const TARGET_JOB: Record<Persona, "MHW-0141" | "MHW-0142"> = {
  anonymous: "MHW-0141",
  technicianOwnJob: "MHW-0141",
  technicianOtherJob: "MHW-0142",
  supervisor: "MHW-0142",
  admin: "MHW-0141",
};

/**
 * What a page answers:
 * - "page": 200 and the page itself;
 * - "page:read-only": 200, the page itself, saying the seat is read-only for this caller;
 * - "forbidden": 200 with the "Not for your role" panel instead of the page (the app renders
 *   components/ui/forbidden.tsx; Next.js keeps the status at 200);
 * - "redirect:/sign-in": 307 to /sign-in, with callbackUrl set to where the caller was going;
 * - "redirect:/jobs": 307 to the jobs board.
 */
export type PageOutcome =
  "page" | "page:read-only" | "forbidden" | "redirect:/sign-in" | "redirect:/jobs" | "redirect:/";

/**
 * What a route handler answers: the HTTP status. 401 and 403 are JSON `{ error, message }`
 * bodies and change nothing; 2xx on a mutating route means the change was made.
 */
export type ApiOutcome = 200 | 201 | 302 | 401 | 403 | 404;

/**
 * What a server action returns (lib/actions/state.ts):
 * - "ok": `{ ok: true }` and the change is made;
 * - "unauthorized": `{ ok: false, message: "Sign in to continue." }`, nothing changed;
 * - "forbidden": `{ ok: false }` with the role's or the assignment's refusal, nothing changed;
 * - "not-found": `{ ok: false }` as for a record that does not exist, nothing changed.
 */
export type ActionOutcome = "ok" | "unauthorized" | "forbidden" | "not-found";

type Row<T> = Record<Persona, T> & { why: string };

/**
 * Route handlers and actions also have a sixth column, checked in-process where a second shop
 * can be made: a supervisor or admin of another shop (whichever their own shop would let act)
 * on this shop's records.
 */
type CrossShopRow<T, C> = Row<T> & { otherShop: C };

export const PAGE_MATRIX: Record<string, Row<PageOutcome>> = {
  "/": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "redirect:/jobs",
    technicianOtherJob: "redirect:/jobs",
    supervisor: "redirect:/jobs",
    admin: "redirect:/jobs",
    why: "The home address sends a technician to their own work and everyone else to the jobs board.",
  },
  "/sign-in": {
    anonymous: "page",
    technicianOwnJob: "redirect:/",
    technicianOtherJob: "redirect:/",
    supervisor: "redirect:/",
    admin: "redirect:/",
    why: "Someone already signed in is sent on to the home address, which sends each role to its start.",
  },
  "/jobs": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Every role of the shop reads the board.",
  },
  "/jobs/new": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "page",
    admin: "page",
    why: "Booking in needs jobs:manage.",
  },
  "/jobs/[jobId]": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Reading a job is open to every role of the shop.",
  },
  "/jobs/[jobId]/edit": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "page",
    admin: "page",
    why: "Editing a job needs jobs:manage, even for the assigned technician.",
  },
  "/jobs/[jobId]/clearance": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Sheets are read by everyone; the writes are the actions' to refuse.",
  },
  "/jobs/[jobId]/measurements": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Sheets are read by everyone; the writes are the actions' to refuse.",
  },
  "/jobs/[jobId]/torque": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Sheets are read by everyone; the writes are the actions' to refuse.",
  },
  "/jobs/[jobId]/report": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "The head report is the shop's record, readable by every role.",
  },
  "/bench/[seatId]": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page:read-only",
    supervisor: "page",
    admin: "page:read-only",
    why: "Anyone may look at a seat; only those who may work on the job get the controls.",
  },
  "/review/[seatId]": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Session review is reading; sign-off is the actions' to refuse.",
  },
  "/audit": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "page",
    admin: "page",
    why: "The audit trail needs jobs:audit.",
  },
  "/admin/people": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "page",
    why: "People are managed by admins alone.",
  },
  "/admin/outbox": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "page",
    why: "The outbox is an admin's to watch.",
  },
  "/customers": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "page",
    admin: "page",
    why: "Customers' contact details are for those who book in and sign off (jobs:manage); technicians do not need them at the bench.",
  },
  "/customers/[customerId]": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "page",
    admin: "page",
    why: "Reading and editing a customer needs jobs:manage.",
  },
  "/admin/shop": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "page",
    why: "The shop's own details (printed on every report) are the admin's to change.",
  },
  "/specs": {
    anonymous: "redirect:/sign-in",
    technicianOwnJob: "page",
    technicianOtherJob: "page",
    supervisor: "page",
    admin: "page",
    why: "Everyone reads the library; changing it is the actions' to refuse.",
  },
};

/**
 * Another shop's caller: 404 for an id of this shop; "own-shop" where the route lists records and
 * must list only the caller's shop's; "n/a" where the route holds no shop's records at all.
 */
export type CrossShopApi = 404 | "own-shop" | "n/a";

export const ROUTE_MATRIX: Record<string, CrossShopRow<ApiOutcome, CrossShopApi>> = {
  "GET /r/[token]": {
    anonymous: 404,
    technicianOwnJob: 404,
    technicianOtherJob: 404,
    supervisor: 404,
    admin: 404,
    otherShop: "n/a",
    why: "The customer's report link: the token is the key, not a session, so a token that is no link is a plain 404 for everyone; a real one opens for anyone holding it (200), 410 once expired or revoked.",
  },
  "GET /api/health": {
    anonymous: 200,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: "n/a",
    why: "Liveness for load balancers: says only whether the database answers.",
  },
  "GET /api/auth/[...nextauth]": {
    anonymous: 200,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: "n/a",
    why: "next-auth's own endpoints (csrf, session): the session says who is signed in, and nothing for anonymous.",
  },
  "POST /api/auth/[...nextauth]": {
    anonymous: 302,
    technicianOwnJob: 302,
    technicianOtherJob: 302,
    supervisor: 302,
    admin: 302,
    otherShop: "n/a",
    why: "Sign-in and sign-out posts without next-auth's CSRF token are sent back to sign-in (?csrf=true) and change nothing.",
  },
  "GET /api/jobs": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: "own-shop",
    why: "The shop's job list, for every role; another shop sees only its own.",
  },
  "GET /api/audit": {
    anonymous: 401,
    technicianOwnJob: 403,
    technicianOtherJob: 403,
    supervisor: 200,
    admin: 200,
    otherShop: "own-shop",
    why: "The audit trail needs jobs:audit; another shop's trail holds none of this shop's entries.",
  },
  "GET /api/audit/csv": {
    anonymous: 401,
    technicianOwnJob: 403,
    technicianOtherJob: 403,
    supervisor: 200,
    admin: 200,
    otherShop: "own-shop",
    why: "The audit trail's CSV export needs jobs:audit, as the trail does; another shop's export holds none of this shop's entries.",
  },
  "GET /api/heads/[headId]/sheets": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "A head's sheets as CSV, read by every role of its shop.",
  },
  "GET /api/photos/[photoId]": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "A seat photo, read by every role of its shop.",
  },
  "GET /api/seats/[seatId]": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "The seat's record, with canWork telling whether this caller may record on it.",
  },
  "GET /api/seats/[seatId]/photos": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "The seat's photo list, read by every role of its shop.",
  },
  "GET /api/seats/[seatId]/checks": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "The seat's done-checks, read by every role of its shop.",
  },
  "POST /api/seats/[seatId]/photos": {
    anonymous: 401,
    technicianOwnJob: 201,
    technicianOtherJob: 403,
    supervisor: 201,
    admin: 403,
    otherShop: 404,
    why: "Adding a photo is work on the job.",
  },
  "POST /api/seats/[seatId]/sessions": {
    anonymous: 401,
    technicianOwnJob: 201,
    technicianOtherJob: 403,
    supervisor: 201,
    admin: 403,
    otherShop: 404,
    why: "Starting a lapping session is work on the job.",
  },
  "POST /api/sessions/[sessionId]/end": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 403,
    supervisor: 200,
    admin: 403,
    otherShop: 404,
    why: "Ending a session is work on the job.",
  },
  "POST /api/sessions/[sessionId]/strokes": {
    anonymous: 401,
    technicianOwnJob: 201,
    technicianOtherJob: 403,
    supervisor: 201,
    admin: 403,
    otherShop: 404,
    why: "Saving strokes is work on the job.",
  },
  "GET /api/sessions/[sessionId]/recording": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 200,
    supervisor: 200,
    admin: 200,
    otherShop: 404,
    why: "Listening to a session is reading, open to every role of its shop.",
  },
  "PUT /api/sessions/[sessionId]/recording": {
    anonymous: 401,
    technicianOwnJob: 201,
    technicianOtherJob: 403,
    supervisor: 201,
    admin: 403,
    otherShop: 404,
    why: "Uploading a recording is work on the job.",
  },
  "GET /api/sessions/[sessionId]/recording/chunks": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 403,
    supervisor: 200,
    admin: 403,
    otherShop: 404,
    why: "The resumable upload's progress belongs to the upload, which is work on the job.",
  },
  "HEAD /api/sessions/[sessionId]/recording/chunks": {
    anonymous: 401,
    technicianOwnJob: 200,
    technicianOtherJob: 403,
    supervisor: 200,
    admin: 403,
    otherShop: 404,
    why: "The same progress as GET, in headers.",
  },
  "PUT /api/sessions/[sessionId]/recording/chunks": {
    anonymous: 401,
    technicianOwnJob: 201,
    technicianOtherJob: 403,
    supervisor: 201,
    admin: 403,
    otherShop: 404,
    why: "A recording chunk is work on the job; a single chunk holding the whole file completes the upload (201).",
  },
};

/**
 * Another shop's caller: "not-found" when the action names a record (or a person) of this shop;
 * "own-shop" where it names none and its change lands in the caller's own shop.
 */
export type CrossShopAction = "not-found" | "own-shop";

export const ACTION_MATRIX: Record<string, CrossShopRow<ActionOutcome, CrossShopAction>> = {
  "lib/actions/done-checks.ts#saveDoneCheck": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Recording a done-check (contact ring, marking compound, leak test) is work on the job.",
  },
  "lib/actions/jobs.ts#createJob": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Booking in needs jobs:manage; another shop cannot assign this shop's technician.",
  },
  "lib/actions/jobs.ts#updateJob": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Editing a job needs jobs:manage, even for the assigned technician.",
  },
  "lib/actions/jobs.ts#changeJobStatus": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "A technician moves only jobs they may work on; the life cycle says which role makes which move.",
  },
  "lib/actions/jobs.ts#takeHeadBack": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Taking a handed-in head back to the bench, before its audit starts, is work on the job.",
  },
  "lib/actions/mail.ts#retryMailAction": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "not-found",
    why: "Sending failed mail again is an admin's job, for their own shop's outbox.",
  },
  "lib/actions/review.ts#submitApproveSettled": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Approving a head's settled seats at once is a supervisor's alone, as approving one is.",
  },
  "lib/actions/review.ts#submitSeatReview": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Approving a seat is a supervisor's alone.",
  },
  "lib/actions/review.ts#submitSeatReopen": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Reopening a seat is a supervisor's alone.",
  },
  "lib/actions/review.ts#submitHeadReview": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Signing off or sending back a head is a supervisor's alone.",
  },
  "lib/actions/review.ts#submitCustomerLinkRevoke": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Revoking a customer's report link is a supervisor's alone, like sign-off.",
  },
  "lib/actions/review.ts#submitHeadReopen": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Reopening a head is a supervisor's alone.",
  },
  "lib/actions/sheets.ts#saveClearanceReading": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Recording a measurement is work on the job.",
  },
  "lib/actions/sheets.ts#saveMeasurement": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Recording a measurement is work on the job.",
  },
  "lib/actions/sheets.ts#saveSeatMeasurements": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Recording a seat's measurements is work on the job.",
  },
  "lib/actions/sheets.ts#saveTorqueSetup": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Setting up a torque sheet is work on the job.",
  },
  "lib/actions/sheets.ts#saveTick": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Ticking a bolt is work on the job.",
  },
  "lib/actions/sheets.ts#undoLastTick": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Undoing a mistaken tick is work on the job, like ticking.",
  },
  "lib/actions/sheets.ts#saveValveIdentity": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Identifying a valve is work on the job.",
  },
  "lib/actions/sheets.ts#saveValveMove": {
    anonymous: "unauthorized",
    technicianOwnJob: "ok",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "forbidden",
    otherShop: "not-found",
    why: "Moving a valve between seats is work on the job.",
  },
  "lib/actions/specs.ts#createEngineSpec": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "own-shop",
    why: "The specifications library needs specs:manage; a new engine lands in the caller's own shop.",
  },
  "lib/actions/specs.ts#saveSpecFigure": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "The specifications library needs specs:manage.",
  },
  "lib/actions/specs.ts#saveJobOverride": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Overriding a job's figure needs specs:manage, even for the assigned technician.",
  },
  "lib/actions/customers.ts#createCustomer": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "own-shop",
    why: "Customers are added by those who book in (jobs:manage); a new customer joins the caller's own shop.",
  },
  "lib/actions/customers.ts#updateCustomer": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Editing a customer needs jobs:manage; another shop's customer answers as one that does not exist.",
  },
  "lib/actions/shop.ts#updateShopSettings": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "own-shop",
    why: "The shop's details are the admin's; an admin only ever changes their own shop.",
  },
  "lib/actions/specs.ts#renameEngineSpec": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Renaming an engine of the library needs specs:manage.",
  },
  "lib/actions/specs.ts#setEngineSpecRetired": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "ok",
    admin: "ok",
    otherShop: "not-found",
    why: "Retiring an engine from new jobs needs specs:manage.",
  },
  "lib/actions/users.ts#createUser": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "own-shop",
    why: "People are managed by admins alone; a new person joins the admin's own shop.",
  },
  "lib/actions/users.ts#resetPassword": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "not-found",
    why: "People are managed by admins alone.",
  },
  "lib/actions/users.ts#changeRole": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "not-found",
    why: "People are managed by admins alone.",
  },
  "lib/actions/users.ts#setActive": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "not-found",
    why: "People are managed by admins alone; deactivating ends the person's sessions.",
  },
  "lib/actions/users.ts#endSessions": {
    anonymous: "unauthorized",
    technicianOwnJob: "forbidden",
    technicianOtherJob: "forbidden",
    supervisor: "forbidden",
    admin: "ok",
    otherShop: "not-found",
    why: "People are managed by admins alone.",
  },
};

/** True for the statuses that mean the gate let the caller through. */
export const isAllowed = (status: number) => status >= 200 && status < 300;
