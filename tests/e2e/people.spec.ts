import { expect, expectAccessible, signIn, test } from "./fixtures";

test.describe("People (administrator)", () => {
  test("add a person with roles, see field errors first, then the person signs in; deactivation locks them out", async ({ page }) => {
    const email = `nadia.voss-${Date.now()}@larkspur.example`;
    await page.goto("/signin?callbackUrl=%2Fpeople");
    await signIn(page, "admin");
    await expect(page).toHaveURL(/\/people$/);
    await expect(page.getByRole("cell", { name: "clinician@larkspur.example" })).toBeVisible();
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/people.png", fullPage: true });

    await page.getByRole("link", { name: "Add a person" }).click();
    await expect(page.getByRole("heading", { level: 1, name: "Add a person" })).toBeVisible();
    await page.getByLabel("Full name").fill("N");
    await page.getByLabel("Work e-mail").fill("not-an-address");
    await page.getByLabel("Initial password").fill("short");
    await page.getByRole("button", { name: "Add person" }).click();
    await expect(page.locator("#name-error")).toContainText("full name");
    await expect(page.locator("#email-error")).toContainText("valid work e-mail");
    await expect(page.locator("#password-error")).toContainText("12 characters");
    // Nothing typed is lost, and a corrected field drops its stale message.
    await expect(page.getByLabel("Full name")).toHaveValue("N");
    await expect(page.getByLabel("Work e-mail")).toHaveValue("not-an-address");
    await page.getByLabel("Full name").fill("Nadia Voss");
    await expect(page.locator("#name-error")).toBeEmpty();
    await expect(page.locator("#email-error")).toContainText("valid work e-mail");
    await expectAccessible(page);

    await page.getByLabel("Full name").fill("Nadia Voss");
    await page.getByLabel("Work e-mail").fill(email);
    await page.getByLabel("Initial password").fill("a-good-long-password");
    await page.getByLabel("Clinician in 4 West Step-Down").check();
    await page.screenshot({ path: ".corvane/screenshots/people-new.png", fullPage: true });
    await page.getByRole("button", { name: "Add person" }).click();
    await expect(page).toHaveURL(/\/people\/[0-9a-f-]+\?created=1$/);
    await expect(page.getByText("Nadia Voss was added and can now sign in.")).toBeVisible();
    await expect(page.getByLabel("Clinician in 4 West Step-Down")).toBeChecked();
    const personUrl = page.url().replace(/\?.*$/, "");

    // The new person signs in and lands on the 4 West census.
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);
    await signIn(page, { email, password: "a-good-long-password" });
    await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);

    // The admin deactivates them, with a reason; they can no longer sign in.
    await page.goto(`/signin?callbackUrl=${encodeURIComponent(new URL(personUrl).pathname)}`);
    await signIn(page, "admin");
    await page.getByLabel("Reason").fill("Left the unit (test)");
    await page.getByRole("button", { name: "Deactivate Nadia Voss" }).click();
    await expect(page.getByText("Nadia Voss is deactivated")).toBeVisible();
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/signin/);
    await signIn(page, { email, password: "a-good-long-password" });
    await expect(page.locator("#signin-error")).toContainText("deactivated");
  });

  test("a clinician cannot open People and sees the forbidden page", async ({ page }) => {
    await page.goto("/signin?callbackUrl=%2Fpeople");
    await signIn(page, "clinician");
    await expect(page).toHaveURL(/\/forbidden$/);
    await expect(page.getByRole("heading", { name: "Not available to your roles" })).toBeVisible();
    await expect(page.getByRole("navigation", { name: "Main" }).getByRole("link")).toHaveText(["Ward overview", "Handoff summary", "Review queue", "Census"]);
  });
});
