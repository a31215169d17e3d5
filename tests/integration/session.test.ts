// The signed-in user of each request (app/lib/session.server.ts) on the real database and
// better-auth: the same user better-auth's own getSession gives, and every ended, tampered or
// expired session refused at once, since the session is read from the database each time.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { auth } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { sessionUser } from "~/lib/session.server";
import { createUser } from "../support/fixtures";

const headersOf = (cookie: string) => new Headers({ cookie });
const tokenOf = (cookie: string) => decodeURIComponent(/better-auth\.session_token=([^;]+)/.exec(cookie)![1]).split(".")[0];

describe("the signed-in user of a request", () => {
  it("is the user better-auth's getSession gives, field for field", async () => {
    for (const role of ["owner", "technician", "admin"] as const) {
      const u = await createUser(role);
      const theirs = await auth.api.getSession({ headers: headersOf(u.cookie) });
      expect(theirs).not.toBeNull();
      expect(await sessionUser(headersOf(u.cookie))).toStrictEqual(theirs!.user);
    }
  });

  it("is nobody without a cookie, with another site's cookies, or with a cookie whose signature does not match", async () => {
    const u = await createUser("owner");
    expect(await sessionUser(new Headers())).toBeNull();
    expect(await sessionUser(headersOf("theme=dark; other=1"))).toBeNull();
    const [name, value] = u.cookie.split("=");
    const [token, signature] = decodeURIComponent(value).split(".");
    // Another token under the same signature, a signature cut short, a signature from another key.
    const other = `${token.slice(0, -1)}${token.endsWith("a") ? "b" : "a"}`;
    expect(await sessionUser(headersOf(`${name}=${encodeURIComponent(`${other}.${signature}`)}`))).toBeNull();
    expect(await sessionUser(headersOf(`${name}=${encodeURIComponent(`${token}.${signature.slice(1)}`)}`))).toBeNull();
    expect(await sessionUser(headersOf(`${name}=${encodeURIComponent(`${token}.${"A".repeat(43)}=`)}`))).toBeNull();
    expect(await sessionUser(headersOf(`${name}=${token}`))).toBeNull();
    expect(await sessionUser(headersOf(u.cookie))).not.toBeNull();
  });

  it("ends at once when the session is revoked or signed out", async () => {
    const u = await createUser("technician");
    expect((await sessionUser(headersOf(u.cookie)))?.id).toBe(u.id);
    await auth.api.revokeSessions({ headers: headersOf(u.cookie) });
    expect(await sessionUser(headersOf(u.cookie))).toBeNull();
    const v = await createUser("owner");
    await auth.api.signOut({ headers: headersOf(v.cookie) });
    expect(await sessionUser(headersOf(v.cookie))).toBeNull();
  });

  it("is nobody once the session has expired, and the expired session is removed", async () => {
    const u = await createUser("owner");
    const token = tokenOf(u.cookie);
    await db.update(s.session).set({ expiresAt: new Date(Date.now() - 60_000) }).where(eq(s.session.token, token));
    expect(await sessionUser(headersOf(u.cookie))).toBeNull();
    expect(await db.query.session.findFirst({ where: eq(s.session.token, token) })).toBeUndefined();
  });

  it("extends a session that is due for it, as better-auth does", async () => {
    const u = await createUser("owner");
    const token = tokenOf(u.cookie);
    const c = await auth.$context;
    // Made more than a day (updateAge) ago: due to be extended to the full 30 days again.
    const old = new Date(Date.now() + (c.sessionConfig.expiresIn - c.sessionConfig.updateAge - 3600) * 1000);
    await db.update(s.session).set({ expiresAt: old }).where(eq(s.session.token, token));
    expect((await sessionUser(headersOf(u.cookie)))?.id).toBe(u.id);
    const after = await db.query.session.findFirst({ where: eq(s.session.token, token) });
    expect(after!.expiresAt.getTime()).toBeGreaterThan(old.getTime() + 3000 * 1000);
  });
});
