import { CAUTION, expect, expectAccessible, signIn, test } from "./fixtures";

test.describe("census and audit trail", () => {
  test("the census lists the unit's 12 beds with current stays, times in the unit's zone, and the caution", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "charge_nurse");
    await expect(page).toHaveURL(/\/queue$/);
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Census" }).click();
    await expect(page).toHaveURL(/\/census$/);
    await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
    await expect(page.getByLabel("Decision-support caution")).toContainText(CAUTION);
    const rows = page.getByRole("table").getByRole("row");
    await expect(rows).toHaveCount(13); // header + 12 beds
    await expect(page.getByText("9 of 12 beds occupied")).toBeVisible();
    await expect(page.getByText(/^As of \w{3} \d{1,2} \w{3}, \d{2}:\d{2} E[SD]T/)).toBeVisible();
    await expect(page.getByRole("row", { name: /4W-01 Tillery, Rowan DEMO-40117/ })).toContainText(/E[SD]T/);
    await expect(page.getByRole("row", { name: /4W-04/ })).toContainText("Empty bed");
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/census.png", fullPage: true });
  });

  test("the unit switcher moves a two-unit person between units; a one-unit person cannot reach the other", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "biomed");
    await expect(page).toHaveURL(/\/stream-health$/);
    const heading = page.getByRole("heading", { level: 1 });
    const firstName = (await heading.textContent())!;
    const firstUrl = page.url();
    await page.locator("summary", { hasText: firstName }).click();
    await page.getByRole("list", { name: "Switch unit" }).getByRole("link").first().click();
    await expect(heading).not.toHaveText(firstName);
    const neonatalUrl = firstName.includes("Neonatal") ? firstUrl : page.url();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);
    await signIn(page, "clinician"); // 4 West only
    await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
    await page.goto(neonatalUrl);
    await expect(page).toHaveURL(/\/forbidden$/);
    await expect(page.getByRole("heading", { name: "Not available to your roles" })).toBeVisible();
  });

  test("the quality officer sees views and changes in the audit trail and checks the chain", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "quality");
    await expect(page).toHaveURL(/\/audit$/);
    await expect(page.getByRole("cell", { name: "census.view" }).first()).toBeVisible();
    await expect(page.getByRole("cell", { name: "auth.sign_in" }).first()).toBeVisible();
    await page.getByRole("button", { name: "Check the chain" }).click();
    await expect(page.getByRole("status").filter({ hasText: /Chain intact: [\d,]+ entries checked from #1 to #/ })).toBeVisible();
    await page.getByLabel("From entry").fill("9");
    await page.getByLabel("To entry").fill("2");
    await page.getByRole("button", { name: "Check the chain" }).click();
    await expect(page.locator("#toSeq-error")).toContainText("must not come before");
    await expect(page.getByLabel("From entry")).toHaveValue("9");
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/audit.png", fullPage: true });
  });
});
