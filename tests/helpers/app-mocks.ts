// What app code sees as "who is signed in" and "the database" in in-process tests. Call
// mockAppContext() at the top of a test file, then import app modules with `await import(...)`:
// next-auth's getServerSession answers with `session`, getDb with `t.db`, and revalidatePath does
// nothing (there is no Next.js cache outside a request).
import { vi } from "vitest";
import type { TestDatabase } from "./db";

export interface AppContext {
  session: null | { user: { id: string } };
  t: TestDatabase | null;
}

export function mockAppContext(): AppContext {
  const ctx: AppContext = { session: null, t: null };
  vi.doMock("next-auth", async (orig) => ({
    ...(await orig<typeof import("next-auth")>()),
    getServerSession: async () => ctx.session,
  }));
  vi.doMock("next/cache", () => ({ revalidatePath: () => {} }));
  vi.doMock("@/db/client", async (orig) => ({
    ...(await orig<typeof import("@/db/client")>()),
    getDb: async () => ctx.t!.db,
  }));
  return ctx;
}
