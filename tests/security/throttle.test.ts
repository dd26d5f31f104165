// The sign-in throttle per network address, with a clock of the test's own.
import { describe, expect, it } from "vitest";
import { AddressThrottle, clientAddress, throttledMessage } from "@/lib/auth/throttle";

const MIN = 60_000;

describe("sign-in throttle per address", () => {
  it("lets an address try until the limit, then makes it wait for the oldest failure to age out", () => {
    const t = new AddressThrottle({ maxFailures: 3, windowMs: 15 * MIN });
    const t0 = 1_000_000;
    for (let i = 0; i < 3; i++) {
      expect(t.waitMinutes("10.0.0.5", t0 + i * MIN)).toBe(0);
      t.recordFailure("10.0.0.5", t0 + i * MIN);
    }
    // Third failure at t0+2 min; the first one (t0) leaves the window at t0+15 min.
    expect(t.waitMinutes("10.0.0.5", t0 + 3 * MIN)).toBe(12);
    expect(t.waitMinutes("10.0.0.5", t0 + 15 * MIN - 1)).toBe(1);
    expect(t.waitMinutes("10.0.0.5", t0 + 15 * MIN)).toBe(0);
    // Another address is not held up by this one.
    expect(t.waitMinutes("10.0.0.6", t0 + 3 * MIN)).toBe(0);
  });

  it("counts failures on any account from the same address", () => {
    const t = new AddressThrottle({ maxFailures: 2, windowMs: MIN });
    t.recordFailure("a", 0);
    t.recordFailure("a", 10);
    expect(t.waitMinutes("a", 20)).toBeGreaterThan(0);
  });

  it("keeps its memory bounded under a flood of addresses", () => {
    const t = new AddressThrottle({ maxFailures: 1, windowMs: MIN }, 100);
    for (let i = 0; i < 1000; i++) t.recordFailure(`addr-${i}`, 0);
    // The oldest addresses were let go; the newest are still held.
    expect(t.waitMinutes("addr-0", 1)).toBe(0);
    expect(t.waitMinutes("addr-999", 1)).toBeGreaterThan(0);
  });

  it("reads the address the nearest server wrote, not the client's own claim", () => {
    expect(clientAddress({ "x-forwarded-for": "1.2.3.4, 10.0.0.9" })).toBe("10.0.0.9");
    expect(clientAddress({ "x-forwarded-for": "10.0.0.9" })).toBe("10.0.0.9");
    expect(clientAddress({ "x-real-ip": "10.0.0.7" })).toBe("10.0.0.7");
    expect(clientAddress({})).toBe("unknown");
    expect(clientAddress(undefined)).toBe("unknown");
  });

  it("says how long to wait", () => {
    expect(throttledMessage(1)).toMatch(/wait 1 minute before/);
    expect(throttledMessage(12)).toMatch(/wait 12 minutes before/);
  });
});
