// Sign-in throttle per network address. The per-account lock (credentials.ts) stops guessing one
// account's password; this stops one machine trying a few passwords on every account. Wrong
// sign-ins are counted per address in a sliding window; past the limit the address must wait
// for its oldest failure to age out. Kept in memory: one server process serves one shop here, and
// a restart forgets the counts (the per-account lock is in the database and survives it).

export interface ThrottlePolicy {
  maxFailures: number;
  windowMs: number;
}

export class AddressThrottle {
  private failures = new Map<string, number[]>();

  constructor(
    private policy: ThrottlePolicy,
    private maxAddresses = 10_000,
  ) {}

  private recent(address: string, now: number): number[] {
    const list = (this.failures.get(address) ?? []).filter((t) => now - t < this.policy.windowMs);
    if (list.length) this.failures.set(address, list);
    else this.failures.delete(address);
    return list;
  }

  /** Minutes to wait before this address may try again, or 0 when it may try now. */
  waitMinutes(address: string, now = Date.now()): number {
    const list = this.recent(address, now);
    if (list.length < this.policy.maxFailures) return 0;
    const oldest = list[list.length - this.policy.maxFailures]!;
    return Math.max(1, Math.ceil((oldest + this.policy.windowMs - now) / 60_000));
  }

  recordFailure(address: string, now = Date.now()): void {
    const list = this.recent(address, now);
    list.push(now);
    // Keep only what the decision needs, and bound the map so a flood of addresses cannot grow it forever.
    this.failures.set(address, list.slice(-this.policy.maxFailures));
    if (this.failures.size > this.maxAddresses) {
      const first = this.failures.keys().next().value;
      if (first !== undefined) this.failures.delete(first);
    }
  }
}

/**
 * The address a request came from: the last X-Forwarded-For entry, which the server in front of
 * the app (Next.js itself, or a shop's reverse proxy) wrote; earlier entries are the client's own
 * claim and can be forged.
 */
export function clientAddress(headers: Record<string, string | string[] | undefined> | undefined): string {
  const raw = headers?.["x-forwarded-for"] ?? headers?.["x-real-ip"];
  const value = Array.isArray(raw) ? raw.join(",") : (raw ?? "");
  const parts = value.split(",").map((p) => p.trim()).filter(Boolean);
  return parts[parts.length - 1] ?? "unknown";
}

export { throttledMessage } from "./sign-in-errors";
