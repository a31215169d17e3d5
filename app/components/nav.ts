// The main navigation. An entry with `need` is shown to accounts whose role grants that
// permission (the vocabulary of app/lib/permissions.ts, which the pages check again on the
// server); an entry without it is for every signed-in account.
import type { Permission } from "~/lib/permissions";

export type NavItem = { to: string; label: string; need?: Permission };

export const NAV_ITEMS: NavItem[] = [
  { to: "/tubs", label: "Tubs" },
  { to: "/products", label: "Products" },
  { to: "/notifications", label: "Notifications" },
  { to: "/clients", label: "Clients", need: { client: ["look-after"] } },
  { to: "/charts", label: "Charts", need: { chart: ["edit"] } },
  { to: "/admin/users", label: "Users", need: { user: ["list"] } },
  { to: "/dev/inbox", label: "Mail inbox", need: { mail: ["read"] } },
  { to: "/admin/email", label: "E-mail log", need: { mail: ["read"] } },
];
