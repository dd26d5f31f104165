// The navigation each role sees. It mirrors the permissions in lib/auth/roles.ts; the server
// still checks every page and action on its own.
import type { UserRole } from "@/db/schema";

export interface NavItem {
  href: string;
  label: string;
}

const BOARD: NavItem = { href: "/jobs", label: "Jobs board" };
const MY_WORK: NavItem = { href: "/jobs?mine=1", label: "My work" };
const AUDIT: NavItem = { href: "/jobs?status=awaiting_audit", label: "Awaiting audit" };
const PEOPLE: NavItem = { href: "/admin/people", label: "People" };
const SPECS: NavItem = { href: "/specs", label: "Specifications" };
const TRAIL: NavItem = { href: "/audit", label: "Audit trail" };
const OUTBOX: NavItem = { href: "/admin/outbox", label: "Outbox" };
const CUSTOMERS: NavItem = { href: "/customers", label: "Customers" };
const SHOP: NavItem = { href: "/admin/shop", label: "Shop details" };

export const NAVIGATION: Record<UserRole, readonly NavItem[]> = {
  technician: [BOARD, MY_WORK],
  supervisor: [BOARD, AUDIT, MY_WORK, CUSTOMERS, SPECS, TRAIL],
  admin: [BOARD, AUDIT, CUSTOMERS, SPECS, TRAIL, PEOPLE, SHOP, OUTBOX],
};
