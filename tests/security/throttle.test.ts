// The sign-in throttle per network address, with a clock of the test's own.
import { describe, expect, it } from "vitest";
import { ADDRESS_HEADER, AddressThrottle, clientAddress, requestAddress, stampAddress, throttledMessage } from "@/lib/auth/throttle";

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

  it("takes the connection's address and ignores X-Forwarded-For when no proxy is trusted", () => {
    for (const forged of ["1.2.3.4", "1.2.3.4, 10.0.0.9", undefined]) {
      expect(clientAddress({ "x-forwarded-for": forged, "x-real-ip": "10.9.9.9" }, "192.0.2.10", 0), String(forged)).toBe("192.0.2.10");
    }
    expect(clientAddress({}, undefined, 0)).toBe("unknown");
    expect(clientAddress(undefined, "", 0)).toBe("unknown");
  });

  it("behind trusted proxies, takes the entry the outermost one wrote, however many the client added", () => {
    // One proxy (say nginx) appends the address it was reached from: the last entry.
    expect(clientAddress({ "x-forwarded-for": "6.6.6.6, 5.5.5.5, 198.51.100.7" }, "10.0.0.2", 1)).toBe("198.51.100.7");
    // Two proxies: the second from the right; the last is the first proxy's own address.
    expect(clientAddress({ "x-forwarded-for": "6.6.6.6, 198.51.100.7, 10.0.0.3" }, "10.0.0.2", 2)).toBe("198.51.100.7");
    // Fewer entries than proxies: the leftmost there is; none at all: the connection.
    expect(clientAddress({ "x-forwarded-for": "198.51.100.7" }, "10.0.0.2", 2)).toBe("198.51.100.7");
    expect(clientAddress({}, "10.0.0.2", 1)).toBe("10.0.0.2");
  });

  it("reads the production server's stamped address only under its token", () => {
    const stamped = stampAddress("192.0.2.44", () => "token-made-at-start-up");
    expect(requestAddress({ [ADDRESS_HEADER]: stamped, "x-forwarded-for": "6.6.6.6" }, 0)).toBe("192.0.2.44");
    // A client's own header, without the token, is not read.
    expect(requestAddress({ [ADDRESS_HEADER]: "guess 6.6.6.6" }, 0)).toBe("unknown");
    expect(requestAddress({ [ADDRESS_HEADER]: "6.6.6.6", "x-forwarded-for": "7.7.7.7, 198.51.100.8" }, 1)).toBe("198.51.100.8");
  });

  it("says how long to wait", () => {
    expect(throttledMessage(1)).toMatch(/wait 1 minute before/);
    expect(throttledMessage(12)).toMatch(/wait 12 minutes before/);
  });
});
