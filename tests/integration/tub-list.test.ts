import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { callRoute, createTub, createUser, shareTub, type TestUser } from "../support/fixtures";
import { importRoute } from "../support/routes";

let ash: TestUser, birch: TestUser, tech: TestUser, admin: TestUser;
let ashTub: string, birchTub: string, otherTub: string;

beforeAll(async () => {
  [ash, birch, tech, admin] = await Promise.all([createUser("owner"), createUser("owner"), createUser("technician"), createUser("admin")]);
  ashTub = (await createTub(ash.id, { name: "Ash garden" })).id;
  birchTub = (await createTub(birch.id, { name: "Birch deck" })).id;
  otherTub = (await createTub(birch.id, { name: "Birch cabin" })).id;
  await shareTub(birchTub, tech.id, birch.id);
});

const ids = (r: { data: unknown }) => ((r.data as { tubs: { id: string }[] }).tubs ?? []).map((t) => t.id);

describe("the tub list", () => {
  it("shows an owner their own tubs only", async () => {
    const { loader } = await importRoute("routes/tubs/list.tsx");
    const r = await callRoute(loader!, { url: "/tubs", user: ash });
    expect(ids(r)).toEqual([ashTub]);
  });

  it("shows a technician the tubs shared with them, not the others", async () => {
    const { loader } = await importRoute("routes/tubs/list.tsx");
    const r = await callRoute(loader!, { url: "/tubs", user: tech });
    expect(ids(r)).toContain(birchTub);
    expect(ids(r)).not.toContain(otherTub);
    expect(ids(r)).not.toContain(ashTub);
  });

  it("shows an admin every tub", async () => {
    const { loader } = await importRoute("routes/tubs/list.tsx");
    // Other tests' tubs share this database: search by owner, so each owner's tubs fit on one page.
    const name = async (u: TestUser) => (await db.query.user.findFirst({ where: eq(s.user.id, u.id) }))!.name;
    const ofAsh = await callRoute(loader!, { url: `/tubs?q=${encodeURIComponent(await name(ash))}`, user: admin });
    const ofBirch = await callRoute(loader!, { url: `/tubs?q=${encodeURIComponent(await name(birch))}`, user: admin });
    expect([...ids(ofAsh), ...ids(ofBirch)]).toEqual(expect.arrayContaining([ashTub, birchTub, otherTub]));
  });

  it("keeps the mail inbox for admins", async () => {
    const { loader } = await importRoute("routes/admin/inbox.tsx");
    expect((await callRoute(loader!, { url: "/dev/inbox", user: ash })).status).toBe(403);
    expect((await callRoute(loader!, { url: "/dev/inbox", user: admin })).status).toBe(200);
  });
});
