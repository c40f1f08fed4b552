// Role × route matrix: every page, route handler and server action found on disk, called as every demo role and
// signed out, must answer as lib/auth/routes.ts and the permission map say.
import { request as playwrightRequest, type APIRequestContext } from "@playwright/test";
import { ACTION_ACCESS, ROUTE_ACCESS, type Access } from "@/lib/auth/routes";
import { can, ROLES, type Grant, type Role } from "@/lib/auth/roles";
import { DEMO_PEOPLE, demoPerson } from "@/seeds/demo-data";
import { builtServerActions, discoverRoutes, discoverServerActions } from "@/tests/support/routes";
import { connect } from "@/tests/support/db";
import { expect, signedInRequest, test } from "./fixtures";

type Caller = Role | "signed_out";
const CALLERS: Caller[] = ["signed_out", ...ROLES];

// Real ids from the e2e database for the parameters in paths.
interface Ids {
  units: Record<string, string>;
  userId: string;
  grants: Record<Role, Grant[]>;
  stays: { stayId: string; unitId: string }[];
  /** An audit entry every audit reader may open (not tied to a unit). */
  auditSeq: string;
  /** One device per unit, with one maintenance attachment of it (seeds/03_device_maintenance.ts). */
  devices: { deviceId: string; unitId: string; attachmentId: string }[];
}
let ids: Ids;

test.beforeAll(async () => {
  const db = connect(process.env.DATABASE_URL!);
  try {
    const units = Object.fromEntries((await db("units").select("code", "id")).map((u) => [u.code, u.id]));
    const userId = (await db("users").where({ email: demoPerson("admin").email }).first("id"))!.id;
    const grants = Object.fromEntries(
      ROLES.map((r) => [r, demoPerson(r).grants.map((g) => ({ unitId: units[g.unitCode]!, role: g.role }))]),
    ) as Record<Role, Grant[]>;
    // One current stay per unit, so stay-addressed routes are tried inside and outside each caller's units.
    const stays = await db("stays as s")
      .join("beds as b", "b.id", "s.bed_id")
      .whereNull("s.discharged_at")
      .distinctOn("b.unit_id")
      .orderBy([{ column: "b.unit_id" }, { column: "s.admitted_at" }])
      .select<{ stayId: string; unitId: string }[]>("s.id as stayId", "b.unit_id as unitId");
    const devices = await db("device_attachments as f")
      .join("device_maintenance as m", "m.id", "f.maintenance_id")
      .join("devices as d", "d.id", "m.device_id")
      .distinctOn("d.unit_id")
      .orderBy([{ column: "d.unit_id" }, { column: "d.serial" }])
      .select<{ deviceId: string; unitId: string; attachmentId: string }[]>("d.id as deviceId", "d.unit_id as unitId", "f.id as attachmentId");
    expect(devices.length, "a device with an attachment in every unit").toBe(Object.keys(units).length);
    const auditSeq = String((await db("audit_events").whereNull("unit_id").orderBy("seq").first("seq"))!.seq);
    ids = { units, userId, grants, stays, devices, auditSeq };
  } finally {
    await db.destroy();
  }
});

test("every page and route handler on disk is in the access table, and nothing else is", () => {
  const { pages, handlers } = discoverRoutes();
  expect([...pages, ...handlers].sort()).toEqual(Object.keys(ROUTE_ACCESS).sort());
});

test("every server action on disk is in the access table and in the build", () => {
  const found = discoverServerActions().map((a) => a.name);
  expect(found).toEqual(Object.keys(ACTION_ACCESS).sort());
  const built = builtServerActions();
  for (const name of found) expect(built.has(name), `${name} in the build`).toBe(true);
});

/** The concrete URLs to try for a route: unit-, stay- and device-scoped routes once per demo unit (a device route
 *  with the device and attachment of the unit in its address). */
function concretePaths(route: string): { path: string; unitId?: string }[] {
  if (route.includes("[deviceId]")) {
    return ids.devices.map((d) => ({
      path: route.replace("[unitId]", d.unitId).replace("[deviceId]", d.deviceId).replace("[attachmentId]", d.attachmentId),
      unitId: d.unitId,
    }));
  }
  const fill = (unitId?: string, stayId?: string) =>
    route
      .replace("[unitId]", unitId ?? "")
      .replace("[stayId]", stayId ?? "")
      .replace("[userId]", ids.userId)
      .replace("[seq]", ids.auditSeq)
      .replace("[...nextauth]", "session");
  if (route.includes("[unitId]")) return Object.values(ids.units).map((u) => ({ path: fill(u), unitId: u }));
  if (route.includes("[stayId]")) return ids.stays.map((s) => ({ path: fill(undefined, s.stayId), unitId: s.unitId }));
  return [{ path: fill() }];
}

function allowed(access: Access, caller: Caller, unitId?: string): boolean {
  if (access.kind === "public") return true;
  if (caller === "signed_out") return false;
  if (access.kind === "signed_in") return true;
  return can(ids.grants[caller], access.permission, unitId);
}

for (const caller of CALLERS) {
  test.describe(`as ${caller}`, () => {
    let api: APIRequestContext;
    test.beforeAll(async ({ baseURL }) => {
      api = await playwrightRequest.newContext({ baseURL });
      if (caller !== "signed_out") await signedInRequest(api, caller);
    });
    test.afterAll(async () => {
      await api.dispose();
    });

    test("pages and route handlers answer as the access table says", async ({ baseURL }) => {
      for (const [route, access] of Object.entries(ROUTE_ACCESS)) {
        for (const { path, unitId } of concretePaths(route)) {
          let status: number;
          let location: string;
          if (access.streaming) {
            // An event stream never ends: read the status line, then hang up.
            const cookie = (await api.storageState()).cookies.map((c) => `${c.name}=${c.value}`).join("; ");
            const abort = new AbortController();
            const r = await fetch(new URL(path, baseURL), { headers: { cookie }, redirect: "manual", signal: abort.signal });
            status = r.status;
            location = r.headers.get("location") ?? "";
            abort.abort();
          } else {
            const res = access.method === "POST" ? await api.post(path, { maxRedirects: 0 }) : await api.get(path, { maxRedirects: 0 });
            status = res.status();
            location = res.headers()["location"] ?? "";
          }
          const what = `${caller} ${access.method ?? "GET"} ${path} → ${status} ${location}`;
          const isApi = route.startsWith("/api/");
          if (allowed(access, caller, unitId)) {
            expect.soft(status < 400 && !/\/signin|\/forbidden/.test(location), what).toBe(true);
          } else if (caller === "signed_out") {
            if (isApi) expect.soft(status, what).toBe(401);
            else expect.soft(status === 307 && location.includes("/signin?callbackUrl="), what).toBe(true);
          } else if (isApi) {
            expect.soft(status, what).toBe(403);
          } else {
            expect.soft(status === 307 && location.endsWith("/forbidden"), what).toBe(true);
          }
        }
      }
    });

    test("server actions answer as the access table says", async ({ baseURL }) => {
      const built = builtServerActions();
      for (const [name, access] of Object.entries(ACTION_ACCESS)) {
        const action = built.get(name)!;
        const page = concretePaths(action.page)[0]!.path;
        // Called with no form at all: an allowed caller gets past the guard to input validation (or a harmless
        // read); nothing is written either way.
        const res = await api.post(page, {
          headers: { "Next-Action": action.id, "Content-Type": "text/plain;charset=UTF-8", Origin: baseURL!, Accept: "text/x-component" },
          data: "[null,null]",
          maxRedirects: 0,
        });
        const body = await res.text();
        const code = /"code":"(unauthorized|forbidden)"/.exec(body)?.[1];
        const what = `${caller} action ${name} → ${res.status()} ${code ?? ""} ${res.headers()["location"] ?? ""}`;
        if (allowed(access, caller)) {
          expect.soft(res.status() === 200 && !code, what).toBe(true);
        } else if (caller === "signed_out") {
          // The proxy turns the signed-out away before the action runs; the action's own guard would say so too.
          expect.soft(res.status() === 307 || code === "unauthorized", what).toBe(true);
        } else {
          expect.soft(code, what).toBe("forbidden");
        }
      }
    });
  });
}

test("the demo has a person for every role", () => {
  for (const r of ROLES) expect(DEMO_PEOPLE.some((p) => p.grants.some((g) => g.role === r))).toBe(true);
});
