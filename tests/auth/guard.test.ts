// The role helper every entry point goes through.
import { describe, expect, it } from "vitest";
import { authorize, type Actor } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { errorResponse, ForbiddenError, UnauthorizedError } from "@/lib/errors";
import { NAVIGATION } from "@/lib/navigation";

const actor = (role: Actor["role"]): Actor => ({ id: "u1", shopId: "s1", name: "N", email: "n@x.example", role });

describe("authorize", () => {
  it("refuses anonymous callers with 401", () => {
    expect(() => authorize(null)).toThrow(UnauthorizedError);
    expect(() => authorize(null, "jobs:read")).toThrow(UnauthorizedError);
  });

  it("refuses a role without the permission with 403 and says who may", () => {
    expect(() => authorize(actor("technician"), "users:manage")).toThrow(ForbiddenError);
    expect(() => authorize(actor("technician"), "users:manage")).toThrow(/admin/);
    expect(() => authorize(actor("technician"), "jobs:audit")).toThrow(/supervisor/);
    expect(() => authorize(actor("admin"), "jobs:work")).toThrow(ForbiddenError);
  });

  it("lets each role through where the table grants it", () => {
    expect(authorize(actor("technician"), "jobs:work").role).toBe("technician");
    expect(authorize(actor("supervisor"), "jobs:audit").role).toBe("supervisor");
    expect(authorize(actor("admin"), "users:manage").role).toBe("admin");
  });

  it("a technician can never audit; only admins manage people", () => {
    expect(can("technician", "jobs:audit")).toBe(false);
    expect(can("supervisor", "users:manage")).toBe(false);
    expect(can("technician", "users:manage")).toBe(false);
  });

  it("maps the errors to JSON 401 and 403 with a message", async () => {
    const r401 = errorResponse(new UnauthorizedError());
    expect(r401.status).toBe(401);
    expect(await r401.json()).toMatchObject({ error: "unauthorized", message: expect.any(String) });
    const r403 = errorResponse(new ForbiddenError("Only an admin can manage people."));
    expect(r403.status).toBe(403);
    expect(await r403.json()).toEqual({ error: "forbidden", message: "Only an admin can manage people." });
  });

  it("offers no navigation a role cannot use", () => {
    for (const [role, items] of Object.entries(NAVIGATION) as Array<[Actor["role"], readonly { href: string }[]]>) {
      if (items.some((i) => i.href.startsWith("/admin"))) expect(can(role, "users:manage")).toBe(true);
      if (items.some((i) => i.href.includes("awaiting_audit"))) expect(can(role, "jobs:audit")).toBe(true);
    }
  });
});
