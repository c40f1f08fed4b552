import { expect, signIn, test } from "./fixtures";

test("after 15 idle minutes the workstation locks, and signing in again returns to the same screen", async ({ page }) => {
  await page.clock.install();
  await page.goto("/signin");
  await signIn(page, "clinician");
  await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
  const censusPath = new URL(page.url()).pathname;

  await page.clock.fastForward("14:00");
  await expect(page.getByText(/This workstation locks in \d+ s/)).toBeVisible();
  await page.clock.fastForward("01:05");
  await expect(page).toHaveURL(/\/signin\?reason=idle&callbackUrl=/);
  await expect(page.getByText(/signed out after a period without activity/)).toBeVisible();
  await signIn(page, "clinician");
  await expect(page).toHaveURL(new RegExp(`${censusPath}$`));
});

test("activity keeps the session open past the idle period", async ({ page }) => {
  await page.clock.install();
  await page.goto("/signin");
  await signIn(page, "clinician");
  await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
  for (let i = 0; i < 3; i++) {
    await page.clock.fastForward("10:00");
    await page.mouse.move(100 + i * 10, 200);
    await page.keyboard.press("Shift");
  }
  await expect(page).not.toHaveURL(/\/signin/);
  await expect(page.getByRole("heading", { level: 1, name: "4 West Step-Down" })).toBeVisible();
});
