// Who may do what. One table, read by the server guard and by the navigation alike; the
// navigation only mirrors it, the guard enforces it.
import type { UserRole } from "@/db/schema";

export type Permission =
  | "jobs:read"
  | "jobs:work"
  | "jobs:audit"
  | "jobs:manage"
  | "specs:manage"
  | "users:manage";

const GRANTS: Record<UserRole, readonly Permission[]> = {
  technician: ["jobs:read", "jobs:work"],
  supervisor: ["jobs:read", "jobs:work", "jobs:audit", "jobs:manage", "specs:manage"],
  admin: ["jobs:read", "jobs:audit", "jobs:manage", "specs:manage", "users:manage"],
};

export function can(role: UserRole, permission: Permission): boolean {
  return GRANTS[role].includes(permission);
}

export const ROLE_LABELS: Record<UserRole, string> = {
  technician: "Technician",
  supervisor: "Supervisor",
  admin: "Admin",
};
