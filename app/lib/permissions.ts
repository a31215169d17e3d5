// Roles and what they may do, shared by the server (better-auth's admin plugin)
// and the browser (to hide buttons). The server always checks again: a hidden
// button is a courtesy, not a permission.
import { createAccessControl } from "better-auth/plugins/access";
import { adminAc, defaultStatements } from "better-auth/plugins/admin/access";

export const statement = {
  ...defaultStatements,
  tub: ["create", "read", "update", "archive"],
  chart: ["read", "create", "update"],
  review: ["read", "update"],
  inbox: ["read"],
} as const;

export const ac = createAccessControl(statement);

export const owner = ac.newRole({
  tub: ["create", "read", "update", "archive"],
  chart: ["read"],
});

export const technician = ac.newRole({
  tub: ["read", "update"],
  chart: ["read", "create", "update"],
  review: ["read", "update"],
});

export const admin = ac.newRole({
  ...adminAc.statements,
  tub: ["create", "read", "update", "archive"],
  chart: ["read", "create", "update"],
  review: ["read", "update"],
  inbox: ["read"],
});

export const roles = { owner, technician, admin };
export type Role = keyof typeof roles;
export const ROLE_NAMES: Role[] = ["owner", "technician", "admin"];

export function hasRole(user: { role?: string | null } | null | undefined, ...wanted: Role[]) {
  if (!user?.role) return false;
  return user.role.split(",").some((r) => wanted.includes(r.trim() as Role));
}
