// The done-checks' kinds, results and names, with nothing else imported: the bench screen's
// bundle, the server and the validation share them. db/schema.ts spells the same lists as its
// enums (tests/bench/done-checks.test.ts holds them equal).
export const DONE_CHECK_KINDS = ["contact_ring", "marking_compound", "leak_test"] as const;
export type DoneCheckKind = (typeof DONE_CHECK_KINDS)[number];
export const DONE_CHECK_RESULTS = ["pass", "fail"] as const;
export type DoneCheckResult = (typeof DONE_CHECK_RESULTS)[number];

export const DONE_CHECK_LABELS: Record<DoneCheckKind, string> = {
  contact_ring: "Contact ring",
  marking_compound: "Marking-compound test",
  leak_test: "Leak test",
};

export const DONE_CHECK_RESULT_LABELS: Record<DoneCheckResult, string> = { pass: "Pass", fail: "Fail" };
