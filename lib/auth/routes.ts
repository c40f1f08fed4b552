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
  "/people": { kind: "permission", permission: "people.manage" },
  "/people/new": { kind: "permission", permission: "people.manage" },
  "/people/[userId]": { kind: "permission", permission: "people.manage" },
  "/audit": { kind: "permission", permission: "audit.view" },
  "/api/health": { kind: "public" },
  "/api/auth/[...nextauth]": { kind: "public" },
  "/api/units/[unitId]/census": { kind: "permission", permission: "census.view", unitParam: "unitId" },
  "/api/units/[unitId]/overview": { kind: "permission", permission: "trends.view", unitParam: "unitId" },
  "/api/stays/[stayId]/night": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/beats": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/window": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/stays/[stayId]/window/research": { kind: "permission", permission: "trends.view", stayParam: "stayId" },
  "/api/units/[unitId]/queue": { kind: "permission", permission: "queue.view", unitParam: "unitId" },
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
};
