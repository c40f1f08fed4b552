// The morning review, as a clinician does it on the demo unit (issue 5): Ward overview → a patient's Night review →
// zoom down to a 5-min tachogram → Window detail and its Research panel → an annotation → the Handoff summary; a
// charge nurse sees the same unit; a biomedical engineer, and a clinician of another unit, are refused. Every
// screen shows the decision-support caution without scrolling and passes axe (no serious or critical violations).
// The e2e database holds a simulated night for beds 4W-01, 4W-02, 4W-03 and 4W-05 (tests/support/seed-review-night.ts).
import { formatInTimeZone } from "date-fns-tz";
import { lastCompletedNight } from "@/lib/review/night";
import { connect } from "@/tests/support/db";
import type { Page } from "@playwright/test";
import { CAUTION, expect, expectAccessible, signIn, test } from "./fixtures";

interface Ids { unit4W: string; stay4W02: string; stay2E: string; night: string; timeZone: string; eveningLocal: string }
let ids: Ids;

test.beforeAll(async () => {
  const db = connect(process.env.DATABASE_URL!);
  try {
    const unit = (await db("units").where({ code: "4W" }).first("id", "time_zone", "night_starts_at", "night_ends_at"))!;
    const stayOf = async (bed: string) =>
      (await db("stays as s").join("beds as b", "b.id", "s.bed_id").where("b.label", bed).whereNull("s.discharged_at").first("s.id"))!.id as string;
    const night = lastCompletedNight(new Date(), { timeZone: unit.time_zone, startsAt: unit.night_starts_at, endsAt: unit.night_ends_at });
    ids = {
      unit4W: unit.id,
      stay4W02: await stayOf("4W-02"),
      stay2E: await stayOf("2E-01"),
      night: night.night,
      timeZone: unit.time_zone,
      // An instant inside the night, an hour after it starts, as a datetime-local value in the unit's zone.
      eveningLocal: formatInTimeZone(night.from.getTime() + 3_600_000, unit.time_zone, "yyyy-MM-dd'T'HH:mm"),
    };
  } finally {
    await db.destroy();
  }
});

/** The caution is on screen without scrolling (1280×800). */
async function cautionInView(page: Page) {
  const caution = page.getByLabel("Decision-support caution").first();
  await expect(caution).toContainText(CAUTION);
  const box = (await caution.boundingBox())!;
  expect(box.y + box.height).toBeLessThanOrEqual(800);
}

test.describe("clinician morning review", () => {
  test("overview → night → 5-min zoom → window detail and research panel → annotation → handoff summary", async ({ page }) => {
    test.setTimeout(120_000);
    await page.goto("/signin");
    await signIn(page, "clinician");

    // Ward overview: every bed of 4 West, values against the patient's own baseline, stream status.
    await expect(page).toHaveURL(new RegExp(`/units/${ids.unit4W}/overview$`));
    await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
    await cautionInView(page);
    const table = page.getByRole("table").first();
    await expect(table.getByRole("row")).toHaveCount(13); // header + 12 beds
    const row = table.getByRole("row", { name: /4W-02/ });
    await expect(row).toContainText(/bpm/);
    await expect(row).toContainText(/baseline/);
    await expect(table.getByRole("row", { name: /4W-04/ })).toContainText("Empty bed");
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/ward-overview.png" });

    // Night review of the last completed night: stacked charts, flag table, events.
    await page.goto(`/stays/${ids.stay4W02}/night?night=${ids.night}`);
    await expect(page.getByRole("heading", { level: 1 })).toContainText("4W-02");
    await cautionInView(page);
    await expect(page.getByText(/22:00 E[SD]T → 06:00 E[SD]T/).first()).toBeVisible();
    for (const chart of ["Heart rate", "SDNN", "RMSSD", "LF/HF", "Sample entropy", "MSE complexity index", "DFA α1", "DFA α2"]) {
      await expect(page.getByRole("heading", { level: 3, name: new RegExp(`^${chart.replace("/", "\\/")}`) })).toBeVisible();
    }
    await page.waitForFunction(() => performance.getEntriesByName("corvane:night-charts-drawn").length > 0);
    // The demo's loss-of-complexity bed raises review flags during the night (DOMAIN §6.2 recipe).
    const flags = page.getByRole("region", { name: "Flagged windows this night" });
    await expect(flags.getByRole("row").nth(1)).toBeVisible();
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/night-review.png" });

    // Multi-scale zoom: whole night → 1 h → 5 min, the last a tachogram of single beats.
    const zoom = page.getByRole("region", { name: /Zoom: heart rate/ });
    await zoom.getByRole("button", { name: "1 h" }).click();
    await expect(zoom.getByText(/\(1 h\)/)).toBeVisible();
    await zoom.getByRole("button", { name: "5 min" }).click();
    await expect(zoom.getByText(/single beats \(tachogram\)/)).toBeVisible();
    await expect(zoom.getByText(/normal beat \(\d+\)/)).toBeVisible();
    await zoom.getByRole("button", { name: /Earlier/ }).click();
    await expect(zoom.getByText(/single beats \(tachogram\)/)).toBeVisible();
    await zoom.screenshot({ path: ".corvane/screenshots/night-zoom-5min.png" });

    // Window detail from the flag table, then the Research panel (closed by default).
    await flags.getByRole("link", { name: /Open first window/ }).first().click();
    await expect(page).toHaveURL(/\/window\?start=/);
    await expect(page.getByRole("heading", { level: 1 })).toContainText("4W-02");
    await cautionInView(page);
    for (const plot of ["Tachogram", "Poincaré plot", "Power spectrum", "Detrended fluctuation analysis", "Multiscale entropy"]) {
      await expect(page.getByText(plot, { exact: false }).first()).toBeVisible();
    }
    const research = page.locator("details", { has: page.getByText("Research panel — research only") });
    await expect(research).not.toHaveAttribute("open");
    await research.locator("summary").click();
    await expect(research.getByText(/Correlation dimension|D2/).first()).toBeVisible({ timeout: 30_000 });
    await expect(research.getByText(/power.law/i).first()).toBeVisible({ timeout: 30_000 });
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/window-detail.png" });

    // An annotation on the night, drawn on the charts and listed.
    await page.goto(`/stays/${ids.stay4W02}/night?night=${ids.night}`);
    const events = page.getByRole("region", { name: "Clinical events this night" });
    await events.getByLabel("When (the unit's local time)").fill(ids.eveningLocal);
    await events.getByLabel("Kind of event").selectOption("repositioning");
    await events.getByLabel("Note").fill("Turned to the left side (invented demo note)");
    await events.getByRole("button", { name: "Add annotation" }).click();
    await expect(events.getByText("Turned to the left side (invented demo note)")).toBeVisible();
    await expect(events.getByText(/Repositioning/).first()).toBeVisible();

    // Handoff summary of the patient for the same night, with the annotation and arrows against the baseline.
    await page.goto(`/stays/${ids.stay4W02}/handoff?night=${ids.night}`);
    await cautionInView(page);
    await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
    await expect(page.getByText(/How to read the arrows/)).toBeVisible();
    await expect(page.getByText(/(above|below) baseline by|steady/).first()).toBeVisible();
    await expect(page.getByText("Turned to the left side (invented demo note)")).toBeVisible();
    await expect(page.getByRole("button", { name: "Print" })).toBeVisible();
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/handoff-summary.png", fullPage: true });
  });

  test("a charge nurse sees the same unit's overview", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "charge_nurse");
    await expect(page).toHaveURL(new RegExp(`/units/${ids.unit4W}/queue$`));
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Ward overview" }).click();
    await expect(page).toHaveURL(new RegExp(`/units/${ids.unit4W}/overview$`));
    await cautionInView(page);
    await expect(page.getByRole("table").first().getByRole("row", { name: /4W-02/ })).toBeVisible();
    await page.goto(`/stays/${ids.stay4W02}/night?night=${ids.night}`);
    await expect(page.getByRole("heading", { level: 1 })).toContainText("4W-02");
  });

  test("a biomedical engineer and a clinician of another unit are refused", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "biomed");
    await expect(page).toHaveURL(/\/stream-health$/);
    for (const path of [`/units/${ids.unit4W}/overview`, `/stays/${ids.stay4W02}/night`, `/stays/${ids.stay4W02}/window`, `/stays/${ids.stay4W02}/handoff`]) {
      await page.goto(path);
      await expect(page, path).toHaveURL(/\/forbidden$/);
    }
    const api = await page.request.get(`/api/stays/${ids.stay4W02}/night`);
    expect(api.status()).toBe(403);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);
    await signIn(page, "clinician"); // 4 West only
    await expect(page).toHaveURL(/\/overview$/);
    await page.goto(`/stays/${ids.stay2E}/night`);
    await expect(page).toHaveURL(/\/forbidden$/);
    expect((await page.request.get(`/api/stays/${ids.stay2E}/beats`)).status()).toBe(403);
  });
});
