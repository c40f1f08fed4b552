// What each page, route handler and server action requires. The guards enforce it at run time; the role × route
// matrix test discovers every route from the file system, fails on any route missing here and checks that the
// running app answers as this table says for every role and for signed-out callers.
import type { Permission } from "./roles";

export type Access = (
  | { kind: "public" }
  | { kind: "signed_in" }
  | { kind: "permission"; permission: Permission; unitParam?: string; stayParam?: string }
) & {
  /** HTTP method the route answers, when not GET (route handlers only). */
  method?: "POST";
  /** An event stream that stays open: callers check the status line only. */
  streaming?: true;
};

/** Pages and route handlers, keyed by their App Router path (route groups removed). */
export const ROUTE_ACCESS: Record<string, Access> = {
  "/": { kind: "signed_in" },
  "/signin": { kind: "public" },
  "/forbidden": { kind: "signed_in" },
  "/units/[unitId]/census": { kind: "permission", permission: "census.view", unitParam: "unitId" },
  "/units/[unitId]/overview": { kind: "permission", permission: "trends.view", unitParam: "unitId" },
  "/units/[unitId]/handoff": { kind: "permission", permission: "trends.view", unitParam: "unitId" },
  // Stay-addressed screens: the guard looks up the stay's unit and checks the role there.
  "/stays/[stayId]/night": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/stays/[stayId]/window": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/stays/[stayId]/handoff": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/units/[unitId]/queue": { kind: "permission", permission: "queue.view", unitParam: "unitId" },
  "/units/[unitId]/rules": { kind: "permission", permission: "rules.manage", unitParam: "unitId" },
  "/mailbox": { kind: "permission", permission: "mailbox.view" },
  // Device registry (biomedical engineers): device pages also check that the device belongs to the unit.
  "/units/[unitId]/devices": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/units/[unitId]/devices/new": { kind: "permission", permission: "devices.manage", unitParam: "unitId" },
  "/units/[unitId]/devices/import": { kind: "permission", permission: "devices.manage", unitParam: "unitId" },
  "/units/[unitId]/devices/[deviceId]": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/units/[unitId]/devices/[deviceId]/health": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/units/[unitId]/devices/[deviceId]/maintenance": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/units/[unitId]/stream-health": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/units/[unitId]/maintenance": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/people": { kind: "permission", permission: "people.manage" },
  "/people/new": { kind: "permission", permission: "people.manage" },
  "/people/[userId]": { kind: "permission", permission: "people.manage" },
  "/audit": { kind: "permission", permission: "audit.view" },
  "/audit/[seq]": { kind: "permission", permission: "audit.view" },
  "/audit/exports": { kind: "permission", permission: "audit.view" },
  "/quality": { kind: "permission", permission: "metrics.view" },
  "/api/health": { kind: "public" },
  "/api/auth/[...nextauth]": { kind: "public" },
  "/api/units/[unitId]/census": { kind: "permission", permission: "census.view", unitParam: "unitId" },
  "/api/units/[unitId]/overview": { kind: "permission", permission: "trends.view", unitParam: "unitId" },
  "/api/stays/[stayId]/night": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/beats": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/window": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/window/research": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/units/[unitId]/queue": { kind: "permission", permission: "queue.view", unitParam: "unitId" },
  "/api/units/[unitId]/stream-health": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/api/units/[unitId]/devices/[deviceId]/health": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  "/api/units/[unitId]/devices/[deviceId]/attachments/[attachmentId]": { kind: "permission", permission: "devices.view", unitParam: "unitId" },
  // Streams the filtered trail as CSV or FHIR R4 AuditEvent NDJSON (?format=csv|fhir-ndjson and the search filter).
  "/api/audit/export": { kind: "permission", permission: "audit.view" },
  "/api/quality/export": { kind: "permission", permission: "metrics.view" },
  // Events are filtered per unit inside the handler.
  "/api/live": { kind: "signed_in", streaming: true },
  // Also open to the scheduler's secret header, checked by the handler itself.
  "/api/jobs/compute": { kind: "permission", permission: "jobs.run", method: "POST" },
};

/** Server actions, keyed by exported name. */
export const ACTION_ACCESS: Record<string, Access> = {
  createPerson: { kind: "permission", permission: "people.manage" },
  updatePersonRoles: { kind: "permission", permission: "people.manage" },
  setPersonActive: { kind: "permission", permission: "people.manage" },
  verifyAuditChain: { kind: "permission", permission: "audit.view" },
  createAnnotation: { kind: "permission", permission: "annotations.write" },
  updateAnnotation: { kind: "permission", permission: "annotations.write" },
  saveHandoffNote: { kind: "permission", permission: "handoff.write" },
  acknowledgeFlag: { kind: "permission", permission: "queue.act" },
  escalateFlag: { kind: "permission", permission: "queue.act" },
  resolveFlag: { kind: "permission", permission: "queue.act" },
  previewRuleSet: { kind: "permission", permission: "rules.manage" },
  saveRuleSet: { kind: "permission", permission: "rules.manage" },
  registerDevice: { kind: "permission", permission: "devices.manage" },
  updateDevice: { kind: "permission", permission: "devices.manage" },
  decommissionDevice: { kind: "permission", permission: "devices.manage" },
  issueStreamToken: { kind: "permission", permission: "devices.manage" },
  rotateStreamToken: { kind: "permission", permission: "devices.manage" },
  revokeStreamToken: { kind: "permission", permission: "devices.manage" },
  assignDevice: { kind: "permission", permission: "devices.manage" },
  unassignDevice: { kind: "permission", permission: "devices.manage" },
  addMaintenanceEntry: { kind: "permission", permission: "devices.manage" },
  previewDeviceImport: { kind: "permission", permission: "devices.manage" },
  confirmDeviceImport: { kind: "permission", permission: "devices.manage" },
};
