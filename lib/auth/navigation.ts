// What the navigation offers a person and where each person lands: only screens their roles may use.
import type { NavItem } from "@/components/shell/NavLinks";
import { can, unitsWhere, type Grant } from "./roles";

export function navItems(grants: readonly Grant[], opts: { demoMode?: boolean } = {}): NavItem[] {
  const items: NavItem[] = [];
  const trendUnits = unitsWhere(grants, "trends.view");
  if (trendUnits.length) {
    items.push({ label: "Ward overview", href: { unitScreen: "overview", unitIds: trendUnits }, matchPrefix: "^/(units/[^/]+/overview|stays/[^/]+/(night|window))" });
    items.push({ label: "Handoff summary", href: { unitScreen: "handoff", unitIds: trendUnits }, matchPrefix: "^/(units|stays)/[^/]+/handoff" });
  }
  const queueUnits = unitsWhere(grants, "queue.view");
  if (queueUnits.length) {
    items.push({ label: "Review queue", href: { unitScreen: "queue", unitIds: queueUnits }, matchPrefix: "^/units/[^/]+/queue" });
  }
  const censusUnits = unitsWhere(grants, "census.view");
  if (censusUnits.length) {
    items.push({ label: "Census", href: { unitScreen: "census", unitIds: censusUnits }, matchPrefix: "^/units/[^/]+/census" });
  }
  const deviceUnits = unitsWhere(grants, "devices.view");
  if (deviceUnits.length) {
    items.push({ label: "Stream health", href: { unitScreen: "stream-health", unitIds: deviceUnits }, matchPrefix: "^/units/[^/]+/(stream-health|devices/[^/]+/health)" });
    items.push({ label: "Device registry", href: { unitScreen: "devices", unitIds: deviceUnits }, matchPrefix: "^/units/[^/]+/devices(?!/[^/]+/(health|maintenance))" });
    items.push({ label: "Maintenance", href: { unitScreen: "maintenance", unitIds: deviceUnits }, matchPrefix: "^/units/[^/]+/(maintenance|devices/[^/]+/maintenance)" });
  }
  if (can(grants, "people.manage")) items.push({ label: "People", href: "/people", matchPrefix: "^/people" });
  const ruleUnits = unitsWhere(grants, "rules.manage");
  if (ruleUnits.length) items.push({ label: "Rule sets", href: { unitScreen: "rules", unitIds: ruleUnits }, matchPrefix: "^/units/[^/]+/rules" });
  if (opts.demoMode && can(grants, "mailbox.view")) items.push({ label: "Mailbox", href: "/mailbox", matchPrefix: "^/mailbox" });
  if (can(grants, "audit.view")) items.push({ label: "Audit trail", href: "/audit", matchPrefix: "^/audit" });
  if (can(grants, "metrics.view")) items.push({ label: "Quality metrics", href: "/quality", matchPrefix: "^/quality" });
  return items;
}

/** Each role's first screen: charge nurses the Review queue they work, clinicians the Ward overview, biomedical
 *  engineers Stream health, admins People, quality the audit trail. */
export function landingPath(grants: readonly Grant[]): string | null {
  const nurse = grants.find((g) => g.role === "charge_nurse");
  if (nurse) return `/units/${nurse.unitId}/queue`;
  const clinical = grants.find((g) => g.role === "clinician");
  if (clinical) return `/units/${clinical.unitId}/overview`;
  const biomed = grants.find((g) => g.role === "biomed");
  if (biomed) return `/units/${biomed.unitId}/stream-health`;
  if (can(grants, "people.manage")) return "/people";
  if (can(grants, "audit.view")) return "/audit";
  const anyCensus = unitsWhere(grants, "census.view")[0];
  return anyCensus ? `/units/${anyCensus}/census` : null;
}
