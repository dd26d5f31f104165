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

type HeaderBag = Record<string, string | string[] | undefined> | undefined;

/**
 * The address a request came from. With no trusted proxies, the connection's own address: an
 * X-Forwarded-For header is the client's claim (Next.js keeps one the client sent) and is not
 * read. Behind `trustedProxies` reverse proxies that each append the address they were reached
 * from, the entry the outermost of them wrote: that many from the right. Entries left of it are
 * the client's own and can be forged.
 */
export function clientAddress(headers: HeaderBag, socketAddress: string | undefined, trustedProxies: number): string {
  if (trustedProxies > 0) {
    const raw = headers?.["x-forwarded-for"];
    const parts = (Array.isArray(raw) ? raw.join(",") : (raw ?? "")).split(",").map((p) => p.trim()).filter(Boolean);
    if (parts.length > 0) return parts[Math.max(0, parts.length - trustedProxies)]!;
  }
  return socketAddress || "unknown";
}

// The production server (server.ts) reads each request's address from its connection and hands
// it on in ADDRESS_HEADER, marked with a token made at start-up, which a client cannot know; a
// header without the token (a client's, or under `next dev`, which has no such server) is ignored.
export const ADDRESS_HEADER = "x-grindfade-client-address";
type GlobalWithStamp = typeof globalThis & { __grindfadeAddressStamp?: string };

/** The production server: the header value for an address, under this process's token. */
export function stampAddress(address: string, newToken: () => string): string {
  const g = globalThis as GlobalWithStamp;
  g.__grindfadeAddressStamp ??= newToken();
  return `${g.__grindfadeAddressStamp} ${address}`;
}

/** The address the production server stamped on the request; without a valid stamp, clientAddress without a socket. */
export function requestAddress(headers: HeaderBag, trustedProxies: number): string {
  const stamp = (globalThis as GlobalWithStamp).__grindfadeAddressStamp;
  const raw = headers?.[ADDRESS_HEADER];
  const value = Array.isArray(raw) ? raw[0] : raw;
  if (stamp && value?.startsWith(`${stamp} `)) return value.slice(stamp.length + 1);
  return clientAddress(headers, undefined, trustedProxies);
}

export { throttledMessage } from "./sign-in-errors";
