// The main navigation. Each entry names the roles that see it; the pages
// themselves check permissions again on the server.
import type { Role } from "~/lib/permissions";

export type NavItem = { to: string; label: string; roles: Role[] };

export const NAV_ITEMS: NavItem[] = [
  { to: "/tubs", label: "Tubs", roles: ["owner", "technician", "admin"] },
  { to: "/products", label: "Products", roles: ["owner", "technician", "admin"] },
  { to: "/notifications", label: "Notifications", roles: ["owner", "technician", "admin"] },
  { to: "/clients", label: "Clients", roles: ["technician", "admin"] },
  { to: "/charts", label: "Charts", roles: ["technician", "admin"] },
  { to: "/admin/users", label: "Users", roles: ["admin"] },
  { to: "/dev/inbox", label: "Mail inbox", roles: ["admin"] },
  { to: "/admin/email", label: "E-mail log", roles: ["admin"] },
];
