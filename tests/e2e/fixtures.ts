// Shared e2e pieces: an auto fixture that fails any test whose page asked for anything outside its own origin,
// sign-in helpers, and an accessibility check (axe, WCAG 2.x A/AA rules).
import AxeBuilder from "@axe-core/playwright";
import { test as base, expect, type APIRequestContext, type Page } from "@playwright/test";
import { DEMO_PASSWORD, demoPerson } from "@/seeds/demo-data";
import type { Role } from "@/lib/auth/roles";

export const test = base.extend<{ offOriginRequests: string[] }>({
  offOriginRequests: [
    async ({ page, baseURL }, use) => {
      const origin = new URL(baseURL!).origin;
      const seen: string[] = [];
      page.on("request", (req) => {
        const url = new URL(req.url());
        if ((url.protocol === "http:" || url.protocol === "https:" || url.protocol.startsWith("ws")) && url.origin !== origin) seen.push(req.url());
      });
      await use(seen);
      expect(seen, "requests outside the app's own origin").toEqual([]);
    },
    { auto: true },
  ],
});
export { expect };

export async function signIn(page: Page, who: Role | { email: string; password: string }) {
  const { email, password } = typeof who === "string" ? { email: demoPerson(who).email, password: DEMO_PASSWORD } : who;
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

/** A request context signed in through next-auth's own credentials endpoint (for HTTP-level checks). */
export async function signedInRequest(request: APIRequestContext, role: Role) {
  const { csrfToken } = (await (await request.get("/api/auth/csrf")).json()) as { csrfToken: string };
  const res = await request.post("/api/auth/callback/credentials", {
    form: { csrfToken, email: demoPerson(role).email, password: DEMO_PASSWORD, json: "true" },
    maxRedirects: 0,
  });
  expect([200, 302]).toContain(res.status());
  const session = (await (await request.get("/api/auth/session")).json()) as { user?: { email: string } };
  expect(session.user?.email).toBe(demoPerson(role).email);
}

export async function expectAccessible(page: Page) {
  const results = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"]).analyze();
  const serious = results.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
  expect(serious.map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`)).toEqual([]);
}

export const CAUTION = /Decision support only/;
