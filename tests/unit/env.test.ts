// Configuration is validated once, with one plain line naming the bad variable.
import { afterEach, describe, expect, it, vi } from "vitest";

const saved = { ...process.env };
afterEach(() => {
  process.env = { ...saved };
  vi.resetModules();
});

async function load(vars: Record<string, string | undefined>) {
  process.env = { ...saved, ...vars };
  for (const [k, v] of Object.entries(vars)) if (v === undefined) delete process.env[k];
  const { env } = await import("~/lib/env.server");
  return env;
}

describe("configuration", () => {
  it("falls back to the local services when nothing is set", async () => {
    const env = await load({ DATABASE_URL: undefined, S3_ENDPOINT: undefined, SMTP_URL: undefined, NODE_ENV: "development" });
    expect(env()).toMatchObject({
      DATABASE_URL: "postgres://dipwell@127.0.0.1:54329/dipwell",
      S3_ENDPOINT: "http://127.0.0.1:4569",
      SMTP_URL: "smtp://127.0.0.1:1026",
    });
  });

  it("names the bad variable in one line", async () => {
    const env = await load({ SMTP_URL: "mail.example:25" });
    expect(() => env()).toThrow(/^Configuration error: SMTP_URL: SMTP_URL must start with smtp:\/\/ or smtps:\/\/$/);
  });

  it("refuses the local signing secret in production", async () => {
    const env = await load({ NODE_ENV: "production", BETTER_AUTH_SECRET: undefined });
    expect(() => env()).toThrow(/BETTER_AUTH_SECRET must be set/);
  });

  it("refuses a short secret", async () => {
    const env = await load({ BETTER_AUTH_SECRET: "short" });
    expect(() => env()).toThrow(/at least 32 characters/);
  });
});
