import { describe, expect, it } from "vitest";
import { can, PERMISSIONS, ROLES, roleFor, unitsWhere, type Grant } from "@/lib/auth/roles";
import { landingPath, navItems } from "@/lib/auth/navigation";
import { ACTION_ACCESS, ROUTE_ACCESS } from "@/lib/auth/routes";

const U1 = "11111111-1111-4111-8111-111111111111";
const U2 = "22222222-2222-4222-8222-222222222222";

describe("permission map", () => {
  it("scopes every role to its unit", () => {
    const grants: Grant[] = [{ unitId: U1, role: "clinician" }];
    expect(can(grants, "census.view", U1)).toBe(true);
    expect(can(grants, "census.view", U2)).toBe(false);
    expect(can(grants, "people.manage")).toBe(false);
    expect(can(grants, "audit.view")).toBe(false);
  });

  it("keeps biomedical engineers and quality officers to their jobs (minimum necessary)", () => {
    expect(can([{ unitId: U1, role: "quality" }], "census.view", U1)).toBe(false);
    expect(can([{ unitId: U1, role: "quality" }], "audit.view")).toBe(true);
    expect(can([{ unitId: U1, role: "biomed" }], "people.manage")).toBe(false);
    expect(can([{ unitId: U1, role: "biomed" }], "trends.view", U1)).toBe(false);
    expect(can([{ unitId: U1, role: "biomed" }], "devices.manage", U1)).toBe(true);
    expect(can([{ unitId: U1, role: "biomed" }], "devices.manage", U2)).toBe(false);
    for (const role of ["clinician", "charge_nurse", "quality", "admin"] as const) expect(can([{ unitId: U1, role }], "devices.view")).toBe(false);
  });

  it("names the role behind an allowed action and the units it covers", () => {
    const grants: Grant[] = [{ unitId: U1, role: "quality" }, { unitId: U2, role: "admin" }];
    expect(roleFor(grants, "people.manage")).toBe("admin");
    expect(roleFor(grants, "people.manage", U1)).toBeNull();
    expect(unitsWhere(grants, "census.view")).toEqual([U2]);
  });

  it("uses only known roles and permissions in the route and action tables", () => {
    for (const roles of Object.values(PERMISSIONS)) for (const r of roles) expect(ROLES).toContain(r);
    for (const a of [...Object.values(ROUTE_ACCESS), ...Object.values(ACTION_ACCESS)]) {
      if (a.kind === "permission") expect(Object.keys(PERMISSIONS)).toContain(a.permission);
    }
  });
});

describe("landing and navigation", () => {
  it("lands each role on its first screen", () => {
    expect(landingPath([{ unitId: U1, role: "clinician" }])).toBe(`/units/${U1}/overview`);
    expect(landingPath([{ unitId: U1, role: "charge_nurse" }])).toBe(`/units/${U1}/queue`);
    expect(landingPath([{ unitId: U2, role: "biomed" }, { unitId: U1, role: "clinician" }])).toBe(`/units/${U1}/overview`);
    expect(landingPath([{ unitId: U2, role: "biomed" }])).toBe(`/units/${U2}/stream-health`);
    expect(landingPath([{ unitId: U1, role: "admin" }])).toBe("/people");
    expect(landingPath([{ unitId: U1, role: "quality" }])).toBe("/audit");
    expect(landingPath([])).toBeNull();
  });

  it("offers only screens the roles may use", () => {
    expect(navItems([{ unitId: U1, role: "quality" }]).map((i) => i.label)).toEqual(["Audit trail", "Quality metrics"]);
    expect(navItems([{ unitId: U1, role: "clinician" }]).map((i) => i.label)).toEqual(["Ward overview", "Handoff summary", "Review queue", "Census"]);
    expect(navItems([{ unitId: U1, role: "biomed" }]).map((i) => i.label)).toEqual(["Census", "Stream health", "Device registry", "Maintenance"]);
    expect(navItems([{ unitId: U1, role: "admin" }]).map((i) => i.label)).toEqual(["Census", "People", "Rule sets", "Audit trail"]);
    expect(navItems([{ unitId: U1, role: "admin" }], { demoMode: true }).map((i) => i.label)).toEqual(["Census", "People", "Rule sets", "Mailbox", "Audit trail"]);
    expect(navItems([])).toEqual([]);
  });
});
