// Web security: each case reproduces an attack from a probe of the running app
// (open redirect, sign-in brute force, stale reset links and sessions, framing
// and script injection, CSV formulas, oversized or cross-site requests, timing of
// the forgot-password answer) against the built app and the real database.
// CSV rules: OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection).
import http from "node:http";
import { eq, like } from "drizzle-orm";
import pg from "pg";
import { describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { csvCell, csvLine } from "~/lib/csv";
import { auth } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { safeRedirect } from "~/lib/session.server";
import { LIMITS, countAttempt, forgiveAttempt } from "~/lib/sign-in-limit.server";
import { loader as historyLoader } from "~/routes/tubs/history";
import { loader as csvLoader } from "~/routes/tubs/history-csv";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { PASSWORD, callRoute, createTub, createUser } from "../support/fixtures";

const BASE = process.env.E2E_BASE_URL ?? "http://127.0.0.1:3100";
const ORIGIN = new URL(BASE).origin;
const demo = (key: string) => DEMO_USERS.find((u) => u.key === key)!;
const WAIT_FLOOR = 60;
const random = () => Math.random().toString(36).slice(2, 10);

/** The browser tests' database, which the running app uses. */
function appDb() {
  const url = new URL(process.env.TEST_ADMIN_DATABASE_URL!);
  url.pathname = "/dipwell_e2e";
  return new pg.Client({ connectionString: url.toString() });
}

async function httpSignIn(email: string, password: string) {
  const res = await fetch(`${BASE}/api/auth/sign-in/email`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: ORIGIN },
    body: JSON.stringify({ email, password }),
  });
  return { res, cookie: res.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ") };
}

describe("open redirect: safeRedirect keeps every target on this site", () => {
  const bad = [
    "//evil.example/", "/\\evil.example/", "/\\\\evil.example", "/%5Cevil.example/", "/%5C127.0.0.1:8666/x",
    "/%2F%2Fevil.example", "/\t/evil.example", "/\n/evil.example", "/%09/evil.example", "/\r\n/evil.example",
    "https://evil.example/", "javascript:alert(1)", "\\\\evil.example", " /tubs", "/%E0%A4%A", "",
  ];
  for (const to of bad) it(`refuses ${JSON.stringify(to)}`, () => expect(safeRedirect(to)).toBe("/tubs"));
  it("keeps a path on this site with its query", () => {
    expect(safeRedirect("/tubs/abc/history?sort=taken&page=2")).toBe("/tubs/abc/history?sort=taken&page=2");
    expect(safeRedirect("/tubs#x")).toBe("/tubs#x");
  });

  it("a signed-in browser sent to /sign-in?redirectTo=/%5C… stays here", async () => {
    const { cookie } = await httpSignIn(demo("birch").email, DEMO_PASSWORD);
    expect(cookie).not.toBe("");
    for (const target of ["/%5C127.0.0.1:8666/steal", "/%09/127.0.0.1:8666", "//127.0.0.1:8666"]) {
      const res = await fetch(`${BASE}/sign-in?redirectTo=${target}`, { headers: { cookie }, redirect: "manual" });
      expect(res.status).toBe(302);
      expect(res.headers.get("location")).toBe("/tubs");
    }
  });
});

describe("security headers on every response", () => {
  it("pages get a nonce CSP that matches their inline scripts, no framing, nosniff, a referrer policy", async () => {
    const res = await fetch(`${BASE}/sign-in`);
    const csp = res.headers.get("content-security-policy") ?? "";
    const nonce = /'nonce-([^']+)'/.exec(csp)?.[1];
    expect(nonce).toBeTruthy();
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/);
    // Photos go straight to S3 by presigned PUT: the S3 endpoint must be allowed to connect to.
    expect(csp).toMatch(new RegExp(`connect-src 'self' ${new URL(process.env.S3_ENDPOINT!).origin.replace(/[.]/g, "\\.")}`));
    expect(res.headers.get("x-frame-options")).toBe("DENY");
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
    const html = await res.text();
    const inline = [...html.matchAll(/<script(?![^>]*\bsrc=)([^>]*)>/g)];
    expect(inline.length).toBeGreaterThan(0);
    for (const m of inline) expect(m[1]).toContain(`nonce="${nonce}"`);
    // A fresh nonce for every response.
    const again = (await fetch(`${BASE}/sign-in`)).headers.get("content-security-policy");
    expect(again).not.toBe(csp);
  });

  it("JSON, redirects, 404s and static files are covered too", async () => {
    const responses = [
      await fetch(`${BASE}/api/tubs/00000000-0000-0000-0000-000000000000/trends`),
      await fetch(`${BASE}/tubs`, { redirect: "manual" }),
      await fetch(`${BASE}/no-such-page`),
      await fetch(`${BASE}/favicon.svg`),
    ];
    for (const res of responses) {
      expect(res.headers.get("x-frame-options"), res.url).toBe("DENY");
      expect(res.headers.get("x-content-type-options"), res.url).toBe("nosniff");
      expect(res.headers.get("content-security-policy"), res.url).toContain("frame-ancestors 'none'");
    }
  });
});

describe("requests from other sites and oversized requests", () => {
  it("a JSON route refuses a cross-site text/plain POST", async () => {
    const { cookie } = await httpSignIn(demo("birch").email, DEMO_PASSWORD);
    const body = JSON.stringify({ volumeLitres: 1000, readings: {} });
    const foreign = await fetch(`${BASE}/api/water-plan`, {
      method: "POST", body, headers: { cookie, "content-type": "text/plain", origin: "http://127.0.0.1:8666" },
    });
    expect(foreign.status).toBe(403);
    const plainType = await fetch(`${BASE}/api/water-plan`, { method: "POST", body, headers: { cookie, "content-type": "text/plain" } });
    expect(plainType.status).toBe(415);
    expect((await plainType.json()).message).toMatch(/JSON/);
    const formType = await fetch(`${BASE}/api/water-plan`, { method: "POST", body: new URLSearchParams({ a: "1" }), headers: { cookie } });
    expect(formType.status).toBe(415);
  });

  it("a form POST from another site is refused; one from this site goes on", async () => {
    // The framework refuses a cross-origin action (400) before our own check (403) would.
    const foreign = await fetch(`${BASE}/sign-in`, { method: "POST", body: new URLSearchParams({ email: "a@b.test", password: "x" }), headers: { origin: "http://evil.example" } });
    expect([400, 403]).toContain(foreign.status);
    const foreignData = await fetch(`${BASE}/tubs/new.data`, { method: "POST", body: new URLSearchParams({ name: "x" }), headers: { origin: "http://127.0.0.1:8666" } });
    expect([400, 403]).toContain(foreignData.status);
    const own = await fetch(`${BASE}/sign-in`, { method: "POST", body: new URLSearchParams({ email: `nobody-${random()}@dipwell.test`, password: "wrong-password" }), headers: { origin: ORIGIN } });
    expect(own.status).toBe(401);
  });

  it("an anonymous 200 MB POST to /sign-in is refused before its body is read", async () => {
    const url = new URL(`${BASE}/sign-in`);
    const answer = await new Promise<{ status: number; sentBytes: number }>((resolve, reject) => {
      let sentBytes = 0;
      const req = http.request(
        { host: url.hostname, port: url.port, path: url.pathname, method: "POST", headers: { "content-type": "application/x-www-form-urlencoded", "content-length": String(200 * 1024 * 1024) } },
        (res) => { res.resume(); resolve({ status: res.statusCode ?? 0, sentBytes }); req.destroy(); },
      );
      req.on("error", (e) => (sentBytes > 0 ? undefined : reject(e)));
      // Send only 1 MB of the 200 MB promised: the answer must come without the rest.
      const chunk = Buffer.alloc(64 * 1024, "a");
      for (let i = 0; i < 16; i++) { req.write(chunk); sentBytes += chunk.length; }
    });
    expect(answer.status).toBe(413);
    expect(answer.sentBytes).toBeLessThan(2 * 1024 * 1024);
  });
});

describe("one password limiter for every path, in PostgreSQL", () => {
  it("the sign-in form and the HTTP endpoint share one count per account, with a plain wait", async () => {
    const email = `nobody-${random()}@dipwell.test`;
    const form = () => fetch(`${BASE}/sign-in`, { method: "POST", body: new URLSearchParams({ email, password: "wrong-password" }) });
    const api = (xff: string) => fetch(`${BASE}/api/auth/sign-in/email`, {
      method: "POST", headers: { "content-type": "application/json", origin: ORIGIN, "x-forwarded-for": xff }, body: JSON.stringify({ email, password: "wrong-password" }),
    });
    for (let i = 0; i < LIMITS.account / 2; i++) expect((await form()).status).toBe(401);
    // A forged X-Forwarded-For changes nothing: no proxy is trusted here.
    for (let i = 0; i < LIMITS.account / 2; i++) expect((await api(`203.0.113.${i}`)).status).toBe(401);
    const blockedApi = await api("198.51.100.7");
    expect(blockedApi.status).toBe(429);
    expect(Number(blockedApi.headers.get("retry-after"))).toBeGreaterThan(0);
    const blockedForm = await form();
    expect(blockedForm.status).toBe(429);
    expect(await blockedForm.text()).toMatch(/Too many password attempts\. For your account(&#x27;|')s safety, wait 1[45] minutes and try again\./);

    const client = appDb();
    await client.connect();
    try {
      const { rows } = await client.query("select key from password_attempt where key like 'address:%'");
      const keys = rows.map((r) => r.key as string);
      expect(keys.some((k) => /127\.0\.0\.1/.test(k))).toBe(true);
      expect(keys.some((k) => /203\.0\.113|198\.51\.100/.test(k))).toBe(false);
      const { rows: account } = await client.query("select attempts from password_attempt where key = $1", [`account:${email}`]);
      expect(account[0].attempts).toBeGreaterThan(LIMITS.account);
    } finally {
      await client.end();
    }
  });

  it("counts per client address across accounts; a success clears the account and is not held against the address", async () => {
    const address = `address:192.0.2.${Math.floor(Math.random() * 250)}-${random()}`;
    for (let i = 0; i < LIMITS.address; i++) expect((await countAttempt({ address, account: `account:a${i}-${random()}` })).ok).toBe(true);
    const over = await countAttempt({ address, account: `account:fresh-${random()}` });
    expect(over.ok).toBe(false);
    if (!over.ok) expect(over.retryAfterSeconds).toBeGreaterThan(WAIT_FLOOR);

    const account = `account:${random()}`;
    for (let i = 0; i < 3; i++) await countAttempt({ address: null, account });
    await forgiveAttempt({ address: null, account });
    const [row] = await db.select().from(s.passwordAttempt).where(eq(s.passwordAttempt.key, account));
    expect(row).toBeUndefined();
  });

  it("the server API (change password) is limited too", async () => {
    const u = await createUser("owner");
    const headers = new Headers({ cookie: u.cookie });
    let refused: { status?: string; message?: string } | null = null;
    for (let i = 0; i <= LIMITS.account && !refused; i++) {
      await auth.api.changePassword({ body: { currentPassword: `wrong-${i}-password`, newPassword: "another-good-password" }, headers }).catch((e) => {
        if ((e as { status?: string }).status === "TOO_MANY_REQUESTS") refused = e as { status: string; message: string };
      });
    }
    expect(refused).not.toBeNull();
    expect(refused!.message).toMatch(/wait \d+ minutes/);
  });
});

describe("password reset", () => {
  it("ends the other sessions, and a newer reset link ends the older one", async () => {
    const u = await createUser("owner");
    const { headers: second } = await auth.api.signInEmail({ body: { email: u.email, password: PASSWORD }, returnHeaders: true });
    const otherCookie = second.getSetCookie().map((c) => c.split(";")[0]).join("; ");
    const tokens = async () =>
      (await db.select().from(s.verification).where(like(s.verification.identifier, "reset-password:%")))
        .filter((v) => v.value === u.id)
        .map((v) => v.identifier.slice("reset-password:".length));
    await auth.api.requestPasswordReset({ body: { email: u.email, redirectTo: "/reset-password" } });
    const [first] = await tokens();
    await auth.api.requestPasswordReset({ body: { email: u.email, redirectTo: "/reset-password" } });
    const now = await tokens();
    expect(now).toHaveLength(1);
    expect(now[0]).not.toBe(first);
    await expect(auth.api.resetPassword({ body: { token: first, newPassword: "a-new-password-1" } })).rejects.toThrow();
    await auth.api.resetPassword({ body: { token: now[0], newPassword: "a-new-password-2" } });
    for (const cookie of [u.cookie, otherCookie]) {
      expect(await auth.api.getSession({ headers: new Headers({ cookie }) })).toBeNull();
    }
    await expect(auth.api.resetPassword({ body: { token: now[0], newPassword: "a-new-password-3" } })).rejects.toThrow();
  });

  it("forgot-password answers without waiting for the account look-up or the e-mail", async () => {
    // Hold the reset-token table locked: an answer that waits on the work would hang.
    const client = appDb();
    await client.connect();
    try {
      await client.query("begin");
      await client.query("lock table verification in access exclusive mode");
      for (const email of [demo("ash").email, `nobody-${random()}@dipwell.test`]) {
        const res = await fetch(`${BASE}/forgot-password`, { method: "POST", body: new URLSearchParams({ email }), signal: AbortSignal.timeout(8_000) });
        expect(res.status).toBe(200);
        expect(await res.text()).toContain("If an account uses that address");
      }
    } finally {
      await client.query("rollback").catch(() => {});
      await client.end();
    }
  });
});

describe("bad input to account and history", () => {
  it("a 20,000-character name is refused with a plain message", async () => {
    const u = await createUser("owner");
    const err = await auth.api.updateUser({ body: { name: "x".repeat(20_000) }, headers: new Headers({ cookie: u.cookie }) }).catch((e) => e);
    expect(err?.status).toBe("BAD_REQUEST");
    expect(err?.message).toBe("Give a name of 1 to 80 characters.");
    const res = await fetch(`${BASE}/api/auth/sign-up/email`, {
      method: "POST", headers: { "content-type": "application/json", origin: ORIGIN },
      body: JSON.stringify({ name: "y".repeat(20_000), email: `long-${random()}@dipwell.test`, password: "long-name-password" }),
    });
    expect(res.status).toBe(400);
    const [row] = await db.select().from(s.user).where(eq(s.user.id, u.id));
    expect(row.name.length).toBeLessThanOrEqual(80);
  });

  it("history with a bad sort or page is the first page, not an error", async () => {
    const u = await createUser("owner");
    const tub = await createTub(u.id);
    for (const q of ["sort=__proto__", "sort=constructor&dir=up", "sort=toString", "page=-3", "page=abc", "page=1e309", "page=99999999999999999999", "sort=taken&page=%00"]) {
      const r = await callRoute(historyLoader, { url: `/tubs/${tub.id}/history?${q}`, params: { tubId: tub.id }, user: u });
      expect(r.status, q).toBe(200);
      expect((r.data as { sort: string }).sort, q).toMatch(/^(taken|status)$/);
    }
  });
});

describe("CSV exports cannot carry formulas", () => {
  it("neutralises cells starting with = + - @ tab or CR, keeps numbers", () => {
    expect(csvCell('=HYPERLINK("http://evil.example","x")')).toBe(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    expect(csvCell("+1+2")).toBe(`"'+1+2"`);
    expect(csvCell("-2+3")).toBe(`"'-2+3"`);
    expect(csvCell("@SUM(A1)")).toBe(`"'@SUM(A1)"`);
    expect(csvCell("\t=1")).toBe(`"'\t=1"`);
    expect(csvCell("\r=1")).toBe(`"'\r=1"`);
    expect(csvCell(-0.5)).toBe("-0.5");
    expect(csvCell("plain")).toBe("plain");
    expect(csvLine(["a,b", 'say "hi"'])).toBe(`"a,b","say ""hi"""`);
  });

  it("the history export neutralises a confirmer's name and a pad's unit", async () => {
    const owner = await createUser("owner");
    await db.update(s.user).set({ name: '=HYPERLINK("http://evil.example","click")' }).where(eq(s.user.id, owner.id));
    const tub = await createTub(owner.id);
    const [r] = await db.insert(s.reading).values({ tubId: tub.id, status: "confirmed", confirmedBy: owner.id, confirmedAt: new Date() }).returning();
    await db.insert(s.readingPad).values({ readingId: r.id, analyte: "ph", unit: "@cmd", readValue: 7.4, confirmedValue: -0.5, source: "confirmed" });
    const res = await callRoute(csvLoader, { url: `/tubs/${tub.id}/history.csv`, params: { tubId: tub.id }, user: owner });
    const text = await res.response!.text();
    expect(text).toContain(`"'=HYPERLINK(""http://evil.example"",""click"")"`);
    expect(text).toContain(`"'@cmd"`);
    expect(text).toContain(",-0.5,");
    for (const line of text.split("\r\n")) for (const cell of line.split(",")) expect(cell).not.toMatch(/^[=+@\t\r]/);
  });
});

