// Technicians and admins, on a phone and a desktop: visit notes edited and deleted (never dated in
// the future), an invitation declined (the owner is told), a ban that asks for a reason and a
// confirmation, and an expired strip batch flagged and no longer offered to owners.
import { randomUUID } from "node:crypto";
import { eq, isNotNull } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { launch, screenshot, signIn, sizedContext } from "../support/browser";
import { createTub, createUser, PASSWORD, shareTub } from "../support/fixtures";

let browser: Browser;
beforeAll(async () => (browser = await launch()));
afterAll(async () => browser?.close());

describe("admin and technician care", () => {
  for (const size of ["phone", "desktop"] as const) {
    it(`notes, decline, ban, expired strips (${size})`, async () => {
      const owner = await createUser("owner");
      const tech = await createUser("technician");
      const admin = await createUser("admin");
      const tub = await createTub(owner.id, { name: `Harbour tub ${randomUUID().slice(0, 4)}` });
      await shareTub(tub.id, tech.id, owner.id);

      // Visit notes: a future date is refused, a note is edited, then deleted after a confirmation.
      const tctx = await sizedContext(browser, size);
      const tp = await tctx.newPage();
      await signIn(tp, tech.email, PASSWORD);
      await tp.goto(`/tubs/${tub.id}/notes`);
      await tp.getByLabel("Note", { exact: true }).fill("Filter rinsed; cover strap loose.");
      await tp.getByLabel("Visit date").first().fill("2030-01-15");
      await tp.getByRole("button", { name: "Add note" }).click();
      await tp.getByText("The visit date cannot be in the future").waitFor();
      expect(await tp.locator("textarea[name=body]").first().inputValue()).toBe("Filter rinsed; cover strap loose.");
      await screenshot(tp, `50-notes-future-date-${size}`);
      await tp.getByLabel("Visit date").first().fill("");
      await tp.getByRole("button", { name: "Add note" }).click();
      const note = tp.getByTestId("notes").locator("li").filter({ hasText: "Filter rinsed" });
      await note.getByText("Edit this note").click();
      await note.getByLabel("Note").fill("Filter rinsed; cover strap replaced.");
      await note.getByRole("button", { name: "Save the note" }).click();
      await tp.getByText("The note is saved.").waitFor();
      await tp.locator("p", { hasText: "cover strap replaced" }).waitFor();
      const edited = tp.getByTestId("notes").locator("li").filter({ hasText: "cover strap replaced" });
      await edited.getByText("Delete this note…").click();
      await screenshot(tp, `51-notes-delete-confirm-${size}`);
      await edited.getByRole("button", { name: "Yes, delete the note" }).click();
      await tp.getByText("The note is deleted.").waitFor();
      expect(await db.query.visitNote.findFirst({ where: eq(s.visitNote.tubId, tub.id) })).toBeUndefined();

      // Decline an invitation: the invitation closes and the owner is notified.
      const other = await createTub(owner.id, { name: `Pier tub ${randomUUID().slice(0, 4)}` });
      const token = randomUUID().replace(/-/g, "");
      await db.insert(s.invitation).values({ tubId: other.id, email: tech.email, token, invitedBy: owner.id, expiresAt: new Date(Date.now() + 7 * 86_400_000) });
      await tp.goto(`/invitations/${token}`);
      await screenshot(tp, `52-invitation-${size}`);
      await tp.getByRole("button", { name: "Decline" }).click();
      await tp.getByText("You declined this invitation").waitFor();
      expect((await db.query.invitation.findFirst({ where: eq(s.invitation.token, token) }))!.declinedAt).not.toBeNull();
      const told = await db.query.notification.findFirst({ where: eq(s.notification.dedupeKey, `invitation-declined:${(await db.query.invitation.findFirst({ where: eq(s.invitation.token, token) }))!.id}`) });
      expect(told?.userId).toBe(owner.id);
      await tctx.close();

      // Ban: a reason and a confirmation, then the ban shows with its reason.
      const actx = await sizedContext(browser, size);
      const ap = await actx.newPage();
      await signIn(ap, admin.email, PASSWORD);
      await ap.goto(`/admin/users?q=${encodeURIComponent(owner.email)}`);
      const row = ap.getByTestId("users").locator("li").filter({ hasText: owner.email });
      await row.getByText("Ban…").click();
      await row.getByLabel(/Why is .* banned/).fill("Shared the account with strangers");
      await screenshot(ap, `53-ban-confirm-${size}`);
      await row.getByRole("checkbox").check();
      await row.getByRole("button", { name: "Ban this account" }).click();
      await ap.getByTestId("users").locator("li").filter({ hasText: owner.email }).filter({ hasText: "banned: Shared the account with strangers" }).waitFor();
      expect((await db.query.user.findFirst({ where: eq(s.user.id, owner.id) }))!.banned).toBe(true);

      // An expired strip batch: flagged for technicians, not offered to owners, the tub warned.
      const inUse = (await db.query.stripBatch.findFirst({ where: isNotNull(s.stripBatch.currentVersionId) }))!;
      const lot = `OLD-${randomUUID().slice(0, 6)}`;
      const [old] = await db.insert(s.stripBatch).values({ chartId: inUse.chartId, lot, expiresOn: "2024-01-31", currentVersionId: inUse.currentVersionId }).returning();
      await ap.goto(`/charts/${inUse.chartId}`);
      await ap.getByTestId("batch-expired").first().waitFor();
      await screenshot(ap, `54-chart-expired-batch-${size}`);
      await ap.goto("/tubs/new");
      expect(await ap.locator("select[name=batchId] option").allTextContents()).not.toContain(expect.stringContaining(lot));
      expect((await ap.locator("select[name=batchId] option").allTextContents()).some((t) => t.includes(lot))).toBe(false);
      await db.update(s.tub).set({ batchId: old.id }).where(eq(s.tub.id, tub.id));
      await ap.goto(`/tubs/${tub.id}`);
      await ap.getByTestId("strips-expired").waitFor();
      await screenshot(ap, `55-tub-expired-strips-${size}`);
      await actx.close();
    });
  }
});
