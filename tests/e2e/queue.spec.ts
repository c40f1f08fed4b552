// The Review queue as a charge nurse works it on the demo night (issue 6): acknowledge one flag with a reason,
// escalate another to a clinician; the escalation e-mail goes through the outbox and the local SMTP sink into the
// administrator's Mailbox, with the bed and the flag but no patient name. A clinician sees the same queue read-only;
// an administrator previews a rule-set draft on the last night. Every screen passes axe (no serious or critical).
// The e2e database holds a simulated night for beds 4W-01, 4W-02, 4W-03 and 4W-05 (tests/support/seed-review-night.ts),
// whose loss-of-complexity bed raises review flags.
import type { Page } from "@playwright/test";
import { deliverDue } from "@/lib/mail/deliver";
import { createMailSink } from "@/lib/mail/sink";
import { connect } from "@/tests/support/db";
import nodemailer from "nodemailer";
import { CAUTION, expect, expectAccessible, signIn, test } from "./fixtures";

async function cautionInView(page: Page) {
  const caution = page.getByLabel("Decision-support caution").first();
  await expect(caution).toContainText(CAUTION);
  const box = (await caution.boundingBox())!;
  expect(box.y + box.height).toBeLessThanOrEqual(800);
}

test.describe("review queue", () => {
  test("a charge nurse acknowledges one flag and escalates another; the clinician's e-mail reaches the Mailbox without the patient's name", async ({ page }) => {
    test.setTimeout(120_000);
    await page.goto("/signin");
    await signIn(page, "charge_nurse");
    await expect(page).toHaveURL(/\/units\/[0-9a-f-]+\/queue$/);
    await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
    await cautionInView(page);
    const cards = page.getByRole("article");
    await expect(cards.nth(1)).toBeVisible();
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/review-queue.png", fullPage: true });

    // Acknowledge the oldest flag with a reason.
    const first = page.getByRole("article", { name: (await cards.nth(0).getByRole("heading").first().textContent())! });
    await first.getByText("Acknowledge…").click();
    await first.getByLabel("Reason").selectOption("reviewed_no_action");
    await first.getByRole("button", { name: "Acknowledge flag" }).click();
    await expect(first).toContainText(/acknowledged/i);

    // Escalate the next open flag to the unit's clinician.
    const second = page.getByRole("article", { name: (await cards.nth(1).getByRole("heading").first().textContent())! });
    await second.getByText("Escalate…").click();
    await second.getByLabel("Clinician").selectOption({ label: "Dr. Priya Halvorsen" });
    await second.getByRole("button", { name: "Escalate flag" }).click();
    await expect(second).toContainText(/escalated/i);
    const bed = /4W-\d\d/.exec((await second.textContent())!)![0];

    // The mail worker's delivery step, through a local SMTP sink that stores into the e2e database.
    const db = connect(process.env.DATABASE_URL!);
    try {
      const sink = await createMailSink({ db, port: 0 });
      try {
        const transport = nodemailer.createTransport({ host: "127.0.0.1", port: sink.port, secure: false, ignoreTLS: true });
        const sent = await deliverDue(db, transport);
        expect(sent.sent).toBeGreaterThanOrEqual(1);
        transport.close();
      } finally {
        await sink.close();
      }
      const patient = await db("stays as s").join("beds as b", "b.id", "s.bed_id").join("patients as p", "p.id", "s.patient_id")
        .where("b.label", bed).whereNull("s.discharged_at").first("p.display_name", "p.record_number");
      const received = await db("mail_received").orderBy("id", "desc").first("subject", "body_text", "envelope_to");
      expect(received!.envelope_to).toContain("clinician@larkspur.example");
      expect(`${received!.subject} ${received!.body_text}`).toContain(bed);
      for (const secret of [patient!.display_name, patient!.display_name.split(",")[0]!, patient!.record_number]) {
        expect(`${received!.subject}\n${received!.body_text}`).not.toContain(secret);
      }
    } finally {
      await db.destroy();
    }

    // The administrator reads it in the demo Mailbox.
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);
    await signIn(page, "admin");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Mailbox" }).click();
    await expect(page.getByRole("heading", { level: 1, name: "Mailbox" })).toBeVisible();
    const message = page.getByRole("link", { name: new RegExp(bed) }).first();
    await message.click();
    await expect(page.locator("#message-heading")).toContainText(bed);
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/mailbox.png", fullPage: true });
  });

  test("a clinician sees the queue read-only; an administrator previews a rule-set draft on the last night", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "clinician");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Review queue" }).click();
    await expect(page).toHaveURL(/\/queue$/);
    await expect(page.getByRole("article").first()).toBeVisible();
    await expect(page.getByText("Acknowledge…")).toHaveCount(0);
    await expect(page.getByText("Escalate…")).toHaveCount(0);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);

    await signIn(page, "admin");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Rule sets" }).click();
    await expect(page).toHaveURL(/\/rules$/);
    await page.getByRole("button", { name: "Preview on last night" }).click();
    await expect(page.getByText(/This version would have raised \d+ flags? on the night of/)).toBeVisible({ timeout: 30_000 });
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/rule-sets.png", fullPage: true });
  });
});
