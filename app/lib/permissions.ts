// What each role may do: the one permission vocabulary. better-auth's admin plugin
// reads it for its own endpoints (users, sessions); loaders and actions check it with
// `can` / `requirePermission` (app/lib/session.server.ts); the navigation reads the
// same statements to show a link (app/components/nav.ts). A hidden link is a courtesy,
// not a permission: the server always checks again.
// Access to one tub also depends on the tub (its owner, a technician with access):
// that part is the tub guard's (app/lib/tub-access.server.ts).
import { createAccessControl } from "better-auth/plugins/access";
import { adminAc, defaultStatements } from "better-auth/plugins/admin/access";

/** What the app itself checks (besides better-auth's own `user` and `session`). */
const appStatement = {
  /** shared: the tubs whose owners gave this account access; all: every tub */
  tub: ["shared", "all"],
  /** the clients page and accepting an owner's invitation */
  client: ["look-after"],
  /** the review queue: read it, mark readings reviewed */
  review: ["read", "update"],
  /** strip charts: create, edit, calibrate */
  chart: ["edit"],
  /** the mail catcher's inbox and the e-mail log */
  mail: ["read"],
  /** change or delete a visit note someone else wrote */
  note: ["edit-any"],
} as const;

export const statement = { ...defaultStatements, ...appStatement } as const;

export const ac = createAccessControl(statement);

export const owner = ac.newRole({});

export const technician = ac.newRole({
  tub: ["shared"],
  client: ["look-after"],
  review: ["read", "update"],
  chart: ["edit"],
});

/** An admin may do everything. */
export const admin = ac.newRole({ ...adminAc.statements, ...appStatement });

export const roles = { owner, technician, admin };
export type Role = keyof typeof roles;
export const ROLE_NAMES: Role[] = ["owner", "technician", "admin"];

type Statement = typeof statement;
/** One or more actions on one or more resources, all of which are needed: `{ chart: ["edit"] }`. */
export type Permission = { [R in keyof Statement]?: Statement[R][number][] };

function rolesOf(user: { role?: string | null } | null | undefined): Role[] {
  if (!user?.role) return [];
  return user.role.split(",").map((r) => r.trim()).filter((r): r is Role => r in roles);
}

const granted = (role: Role, permission: Permission) => roles[role].authorize(permission as never).success;

/** Whether the user (any of their roles) may do all of `permission`. */
export function can(user: { role?: string | null } | null | undefined, permission: Permission): boolean {
  return rolesOf(user).some((r) => granted(r, permission));
}

/** The roles that may do `permission`, in ROLE_NAMES order (for messages such as "for technician or admin accounts"). */
export function rolesThatCan(permission: Permission): Role[] {
  return ROLE_NAMES.filter((r) => granted(r, permission));
}
