// The permission vocabulary as the pages and the navigation use it: who may do what.
// The expectations are the product's rules (see DEVELOPERS.md, "Roles and permissions").
import { describe, expect, it } from "vitest";
import { NAV_ITEMS } from "~/components/nav";
import { can, rolesThatCan } from "./permissions";

const as = (role: string) => ({ role });

describe("permissions", () => {
  it("gives each page of one role's work to the roles that do that work", () => {
    expect(rolesThatCan({ chart: ["edit"] })).toEqual(["technician", "admin"]);
    expect(rolesThatCan({ client: ["look-after"] })).toEqual(["technician", "admin"]);
    expect(rolesThatCan({ review: ["read", "update"] })).toEqual(["technician", "admin"]);
    expect(rolesThatCan({ tub: ["shared"] })).toEqual(["technician", "admin"]);
    expect(rolesThatCan({ tub: ["all"] })).toEqual(["admin"]);
    expect(rolesThatCan({ mail: ["read"] })).toEqual(["admin"]);
    expect(rolesThatCan({ user: ["list"] })).toEqual(["admin"]);
    expect(rolesThatCan({ note: ["edit-any"] })).toEqual(["admin"]);
  });

  it("reads every role of an account and refuses an unknown or missing role", () => {
    expect(can(as("owner,technician"), { chart: ["edit"] })).toBe(true);
    expect(can(as("owner"), { chart: ["edit"] })).toBe(false);
    expect(can(as("superuser"), { chart: ["edit"] })).toBe(false);
    expect(can(null, { tub: ["shared"] })).toBe(false);
  });

  it("shows each role the links of the pages it may open", () => {
    const links = (role: string) => NAV_ITEMS.filter((i) => !i.need || can(as(role), i.need)).map((i) => i.to);
    expect(links("owner")).toEqual(["/tubs", "/products", "/notifications"]);
    expect(links("technician")).toEqual(["/tubs", "/products", "/notifications", "/clients", "/charts"]);
    expect(links("admin")).toEqual(["/tubs", "/products", "/notifications", "/clients", "/charts", "/admin/users", "/dev/inbox", "/admin/email"]);
  });
});
