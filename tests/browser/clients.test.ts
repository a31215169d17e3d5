// An owner invites the demo technician to a tub by e-mail; the technician accepts from the
// e-mailed link, sees the tub on the clients dashboard with a reading waiting for review,
// reviews it and writes a visit note; an admin sees the users; the owner ends the access.
import { randomUUID } from "node:crypto";
import { eq, like } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { DEMO_PASSWORD, DEMO_USERS } from "~/ops/demo";
import { BASE_URL, firstLink, launch, phoneContext, screenshot, signIn, waitForMail } from "../support/browser";
import { createTub, createUser, PASSWORD } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("clients", () => {
  it("invite, accept, dashboard, review, notes, users, revoke", async () => {
    const owner = await createUser("owner");
    const tub = await createTub(owner.id, { name: `Hillside tub ${randomUUID().slice(0, 4)}`, testEveryDays: 2 });
    const techEmail = DEMO_USERS.find((u) => u.key === "tech")!.email;

    const ownerCtx = await phoneContext(browser);
    const op = await ownerCtx.newPage();
    await signIn(op, owner.email, PASSWORD);
    await op.goto(`/tubs/${tub.id}/sharing`);
    // Inviting oneself is refused in plain words (a malformed address is stopped by the browser's e-mail field).
    await op.getByLabel("Technician's e-mail address").fill(owner.email);
    await op.getByRole("button", { name: "Send invitation" }).click();
    await op.getByRole("alert").filter({ hasText: "your own address" }).waitFor();
    await op.getByLabel("Technician's e-mail address").fill(techEmail);
    await op.getByRole("button", { name: "Send invitation" }).click();
    await op.getByText(`Invitation sent to ${techEmail}`).waitFor();
    await screenshot(op, "30-sharing-invited");

    const mail = await waitForMail(techEmail, new RegExp(tub.name));
    expect(mail.html).toContain("See the invitation");
    const link = new URL(firstLink(mail));
    expect(link.pathname).toMatch(/^\/invitations\//);

    // A reading the reader was unsure about, two days old, with low chlorine.
    // Read with the demo 3-pad chart, so the review shows its swatches beside the values.
    const chart = await db.query.stripChart.findFirst({ where: like(s.stripChart.name, "%3-pad%") });
    const batch = chart ? await db.query.stripBatch.findFirst({ where: eq(s.stripBatch.chartId, chart.id) }) : undefined;
    const [r] = await db
      .insert(s.reading)
      .values({ tubId: tub.id, status: "read", takenAt: new Date(Date.now() - 3 * 86_400_000), chartVersionId: batch?.currentVersionId ?? null })
      .returning();
    await db.insert(s.readingPad).values([
      { readingId: r.id, analyte: "free_chlorine", unit: "mg/L", readValue: 1, confidence: 0.4, needsReview: true, reviewReason: "Please check Free chlorine: its colour is uneven." },
      { readingId: r.id, analyte: "ph", unit: "pH", readValue: 7.4, confidence: 0.9 },
    ]);

    const techCtx = await phoneContext(browser);
    const tp = await techCtx.newPage();
    await signIn(tp, techEmail, DEMO_PASSWORD);
    await tp.goto(link.pathname);
    await tp.getByRole("button", { name: "Accept the invitation" }).click();
    await tp.waitForURL(new RegExp(`/tubs/${tub.id}$`));
    await tp.goto("/clients");
    const card = tp.getByTestId("client-tubs").locator("li").filter({ hasText: tub.name });
    // The unsure reading is marked unconfirmed and not taken as the water until it is reviewed.
    await card.getByText(/Unconfirmed: a newer reading/).waitFor();
    await card.getByText(/No sure reading yet/).waitFor();
    await card.getByText(/test overdue/).waitFor();
    await card.getByText(/1 reading to review/).waitFor();
    await screenshot(tp, "31-clients-dashboard");

    await tp.goto("/clients/review");
    const item = tp.getByTestId("review-item").filter({ hasText: tub.name });
    await item.getByRole("radiogroup", { name: /Free chlorine/ }).or(item.getByRole("group", { name: /Chart colours for Free chlorine/ })).first().waitFor();
    await item.getByLabel("Correct Free chlorine").fill("1.5");
    await screenshot(tp, "32-review");
    await item.getByRole("button", { name: "Save corrections" }).click();
    await tp.waitForURL(/done=1/);
    const reviewed = (await db.query.reading.findFirst({ where: eq(s.reading.id, r.id) }))!;
    expect(reviewed.reviewedAt).not.toBeNull();
    // The owner is told, by e-mail and in the app.
    const told = await waitForMail(owner.email, /your reading was reviewed/);
    expect(told.text).toMatch(/Free chlorine: 1 → 1.5 mg\/L/);
    await tp.goto("/clients");
    await card.getByText(/Free chlorine low \(1\.5 mg\/L/).waitFor();

    await tp.goto(`/tubs/${tub.id}/notes`);
    await tp.getByLabel("Note").fill("Cleaned the filter cartridge; water clear. Shock next visit.");
    await tp.getByRole("button", { name: "Add note" }).click();
    // The note shows once as text (its edit form, folded, holds a copy in a text box).
    await tp.getByTestId("notes").locator("p", { hasText: "Cleaned the filter cartridge" }).waitFor();
    await screenshot(tp, "33-visit-notes");

    // The owner ends the access: the tub is gone for the technician.
    await op.goto(`/tubs/${tub.id}/sharing`);
    await op.getByRole("button", { name: "End access" }).click();
    await op.getByText("No technician yet").waitFor();
    const res = await tp.goto(`/tubs/${tub.id}`);
    expect(res?.status()).toBe(404);
    await ownerCtx.close();
    await techCtx.close();

    const adminCtx = await browser.newContext({ baseURL: BASE_URL, viewport: { width: 1100, height: 900 } });
    const ap = await adminCtx.newPage();
    await signIn(ap, DEMO_USERS.find((u) => u.key === "admin")!.email, DEMO_PASSWORD);
    await ap.goto("/admin/users");
    await ap.getByLabel("Find a user by name or e-mail").fill(techEmail);
    await ap.getByRole("button", { name: "Search" }).click();
    // The address under the name (the folded ban form names it again).
    await ap.getByTestId("users").locator("p", { hasText: techEmail }).first().waitFor();
    await screenshot(ap, "34-admin-users");
    await adminCtx.close();
  });
});
