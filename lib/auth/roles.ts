// Roles (GLOSSARY.md) and the one permission map. Pure data and pure functions: used by the guards,
// the navigation and the role × route matrix test alike.

export const ROLES = ["clinician", "charge_nurse", "biomed", "quality", "admin"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  clinician: "Clinician",
  charge_nurse: "Charge nurse",
  biomed: "Biomedical engineer",
  quality: "Quality officer",
  admin: "Administrator",
};

/** A role held in one unit. Every role is scoped to units. */
export interface Grant {
  unitId: string;
  role: Role;
}

export const PERMISSIONS = {
  /** Unit census: beds and current stays (names, record numbers). */
  "census.view": ["clinician", "charge_nurse", "biomed", "admin"],
  /** Trends of patients in the unit: Ward overview, Night review, Window detail, Handoff summary (audited reads). */
  "trends.view": ["clinician", "charge_nurse"],
  /** Clinical event annotations on a patient's night: add and edit. */
  "annotations.write": ["clinician", "charge_nurse"],
  /** The clinician's note on a patient's Handoff summary. */
  "handoff.write": ["clinician"],
  /** The Review queue of a unit, read-only (clinicians see what the charge nurse works). */
  "queue.view": ["clinician", "charge_nurse"],
  /** Work the Review queue: acknowledge with a reason, escalate to a clinician, resolve. */
  "queue.act": ["charge_nurse"],
  /** Rule sets of a unit: view, preview and save a new version. */
  "rules.manage": ["admin"],
  /** The demo Mailbox: messages the local SMTP sink received. */
  "mailbox.view": ["admin"],
  /** Device registry, stream health and maintenance log of the unit's devices (no clinical values), read-only;
   *  includes downloading maintenance attachments. */
  "devices.view": ["biomed"],
  /** Register, edit, import, decommission devices; issue, rotate and revoke stream tokens; assign to beds; log
   *  maintenance. */
  "devices.manage": ["biomed"],
  /** People: create, change roles, deactivate. */
  "people.manage": ["admin"],
  /** Audit trail: search, detail, chain check, exports (read-only; an export is itself audited). */
  "audit.view": ["quality", "admin"],
  /** Quality metrics: response times, flag burden, coverage, and their CSV export. */
  "metrics.view": ["quality"],
  /** Start a computation run by hand (the scheduler uses its own secret). */
  "jobs.run": ["admin"],
} as const satisfies Record<string, readonly Role[]>;
export type Permission = keyof typeof PERMISSIONS;

export function roleAllows(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

/** True when some grant allows the permission — in `unitId` when given, else in any unit. */
export function can(grants: readonly Grant[], permission: Permission, unitId?: string): boolean {
  return grants.some((g) => (unitId === undefined || g.unitId === unitId) && roleAllows(g.role, permission));
}

/** Units in which the grants allow the permission. */
export function unitsWhere(grants: readonly Grant[], permission: Permission): string[] {
  return [...new Set(grants.filter((g) => roleAllows(g.role, permission)).map((g) => g.unitId))];
}

/** The role that explains an allowed action in a unit (recorded in the audit trail). */
export function roleFor(grants: readonly Grant[], permission: Permission, unitId?: string): Role | null {
  const g = grants.find((x) => (unitId === undefined || x.unitId === unitId) && roleAllows(x.role, permission));
  return g?.role ?? null;
}
