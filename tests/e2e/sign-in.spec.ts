import { CAUTION, expect, expectAccessible, signIn, test } from "./fixtures";
import { DEMO_HOSPITAL, demoPerson } from "@/seeds/demo-data";

test.describe("sign-in", () => {
  test("the sign-in page is calm, accessible and lists the demo people in demo mode", async ({ page }) => {
    await page.goto("/");
    await expect(page).toHaveURL(/\/signin\?callbackUrl=%2F$/);
    await expect(page.getByRole("heading", { name: "Sign in" })).toBeVisible();
    await expect(page.getByText(demoPerson("clinician").email)).toBeVisible();
    await expect(page.getByText(/Decision support only/)).toBeVisible();
    await expect(page.getByText(DEMO_HOSPITAL)).toBeVisible();
    await expectAccessible(page);
    await page.screenshot({ path: ".corvane/screenshots/sign-in.png", fullPage: true });
  });

  const landings = [
    { role: "clinician", url: /\/units\/[0-9a-f-]+\/overview$/, heading: "4 West Step-Down" },
    { role: "charge_nurse", url: /\/units\/[0-9a-f-]+\/queue$/, heading: "4 West Step-Down" },
    { role: "biomed", url: /\/units\/[0-9a-f-]+\/stream-health$/, heading: /Step-Down|Neonatal/ },
    { role: "admin", url: /\/people$/, heading: "People" },
    { role: "quality", url: /\/audit$/, heading: "Audit trail" },
  ] as const;
  for (const l of landings) {
    test(`${l.role} lands on their first screen`, async ({ page }) => {
      await page.goto("/signin");
      await signIn(page, l.role);
      await expect(page).toHaveURL(l.url);
      await expect(page.getByRole("heading", { level: 1, name: l.heading })).toBeVisible();
      await expect(page.getByRole("banner").getByText(demoPerson(l.role).name)).toBeVisible();
      if (/census|overview|queue/.test(l.url.source)) await expect(page.getByLabel("Decision-support caution")).toContainText(CAUTION);
    });
  }

  test("a wrong password gets a clear message and the form keeps the e-mail", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, { email: demoPerson("clinician").email, password: "not-the-password" });
    await expect(page.locator("#signin-error")).toContainText("do not match an account");
    await expect(page.getByLabel("E-mail")).toHaveValue(demoPerson("clinician").email);
  });

  test("empty fields are flagged at the field without a request", async ({ page }) => {
    await page.goto("/signin");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.locator("#email-error")).toContainText("Enter your work e-mail address.");
    await expect(page.locator("#password-error")).toContainText("Enter your password.");
    await expect(page.getByLabel("E-mail")).toHaveAttribute("aria-invalid", "true");
  });

  test("after 5 failed attempts an account is paused with a clear message", async ({ page }) => {
    const who = { email: `someone-${Date.now()}@larkspur.example`, password: "wrong-password" };
    await page.goto("/signin");
    for (let i = 0; i < 5; i++) {
      await signIn(page, who);
      await expect(page.locator("#signin-error")).toContainText("do not match");
      await page.getByRole("button", { name: "Sign in" }).waitFor();
      await expect(page.getByRole("button", { name: "Sign in" })).toBeEnabled();
    }
    await signIn(page, who);
    await expect(page.locator("#signin-error")).toContainText("Too many failed sign-ins");
  });

  test("signing out returns to sign-in and the pages are closed again", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "quality");
    await expect(page).toHaveURL(/\/audit$/);
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page).toHaveURL(/\/signin\?reason=signed_out/);
    await expect(page.getByText("You have signed out.")).toBeVisible();
    await page.goto("/audit");
    await expect(page).toHaveURL(/\/signin\?callbackUrl=%2Faudit/);
  });
});
