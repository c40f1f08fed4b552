// Audit entries as HL7 FHIR R4 (4.0.1) AuditEvent resources, one per NDJSON line. Shapes from @types/fhir (r4);
// elements and value sets from the FHIR R4 specification, AuditEvent resource (§6.4).
//
// AuditEvent.type (required, extensible binding to the audit-event-type value set):
//   | our action                                   | system | code   | display                           |
//   | auth.sign_in, auth.sign_out                  | DCM    | 110114 | User Authentication               |
//   | person.*  (people and their roles)           | DCM    | 110137 | User Security Attributes Changed  |
//   | access.denied                                | DCM    | 110113 | Security Alert                    |
//   | audit.export                                 | DCM    | 110106 | Export                            |
//   | audit.* (trail read, chain check, …)         | DCM    | 110101 | Audit Log Used                    |
//   | compute.run, mail.reminders, demo.seed       | DCM    | 110100 | Application Activity              |
//   | anything else (reads and changes of data     | audit-event-type | rest | RESTful Operation       |
//   |   through the portal's pages, API, actions)  |        |        |                                   |
//   DCM = http://dicom.nema.org/resources/ontology/DCM; audit-event-type = http://terminology.hl7.org/CodeSystem/audit-event-type.
//   Sign-in and sign-out also carry DCM 110122 Login / 110123 Logout in subtype, beside our action code.
// AuditEvent.action (C/R/U/D/E), by the action code's last word:
//   R: view, preview, export · C: create, register, import, issue · U: update, save, roles_change, acknowledge,
//   escalate, resolve, reactivate, deactivate, rotate, revoke, assign, unassign, decommission · D: delete ·
//   E: everything else (sign-in and -out, refusals, jobs, chain checks).
// AuditEvent.outcome: success → "0" Success; denied → "4" Minor failure (the request was refused and nothing was
//   done); failure → "8" Serious failure (the action was attempted and failed).
// The last entity is the trail entry itself: its detail carries the entry's detail, prev_hash, hash and
// "chained-fields", the RFC 8785 canonical JSON the hash covers, so hash = SHA-256(prev_hash ‖ chained-fields).
import type { AuditEvent, AuditEventAgent, AuditEventEntity, Coding } from "fhir/r4";
import canonicalize from "canonicalize";
import { ROLE_LABELS, ROLES, type Role } from "@/lib/auth/roles";
import type { AuditEventRow } from "@/lib/db/tables";
import { canonicalJson } from "../chain";
import { chainedFieldsOf } from "../repository";

const DCM = "http://dicom.nema.org/resources/ontology/DCM";
const AUDIT_EVENT_TYPE = "http://terminology.hl7.org/CodeSystem/audit-event-type";
const SOURCE_TYPE = "http://terminology.hl7.org/CodeSystem/security-source-type";
const ENTITY_TYPE = "http://terminology.hl7.org/CodeSystem/audit-entity-type";
const AGENT_TYPE = "http://terminology.hl7.org/CodeSystem/extra-security-role-type";
/** Corvane's own code systems and identifier namespaces (a deployment would use its organisation's base URL). */
const CORVANE = "https://corvane.example/fhir";
export const ACTION_CODE_SYSTEM = `${CORVANE}/CodeSystem/audit-action`;
const ROLE_CODE_SYSTEM = `${CORVANE}/CodeSystem/role`;
const id = (kind: string) => `${CORVANE}/sid/${kind}`;

const dcm = (code: string, display: string): Coding => ({ system: DCM, code, display });
const SYSTEM_JOBS = new Set(["compute.run", "mail.reminders", "demo.seed"]);

export function eventType(action: string): Coding {
  if (action.startsWith("auth.")) return dcm("110114", "User Authentication");
  if (action.startsWith("person.")) return dcm("110137", "User Security Attributes Changed");
  if (action === "access.denied") return dcm("110113", "Security Alert");
  if (action === "audit.export") return dcm("110106", "Export");
  if (action.startsWith("audit.")) return dcm("110101", "Audit Log Used");
  if (SYSTEM_JOBS.has(action)) return dcm("110100", "Application Activity");
  return { system: AUDIT_EVENT_TYPE, code: "rest", display: "RESTful Operation" };
}

const VERB_ACTION: Record<string, NonNullable<AuditEvent["action"]>> = {
  view: "R", preview: "R", export: "R",
  create: "C", register: "C", import: "C", issue: "C",
  update: "U", save: "U", roles_change: "U", acknowledge: "U", escalate: "U", resolve: "U", reactivate: "U",
  deactivate: "U", rotate: "U", revoke: "U", assign: "U", unassign: "U", decommission: "U",
  delete: "D",
};

export function eventAction(action: string): NonNullable<AuditEvent["action"]> {
  return VERB_ACTION[action.slice(action.lastIndexOf(".") + 1)] ?? "E";
}

export const OUTCOME_CODE: Record<AuditEventRow["outcome"], NonNullable<AuditEvent["outcome"]>> = {
  success: "0",
  denied: "4",
  failure: "8",
};

function agentOf(r: AuditEventRow): AuditEventAgent {
  const human = r.actor_user_id !== null || r.actor_email !== null;
  const role = r.actor_role;
  return {
    type: { coding: [human ? { system: AGENT_TYPE, code: "humanuser", display: "human user" } : { system: AGENT_TYPE, code: "dataprocessor", display: "data processor" }] },
    ...(role
      ? { role: [{ coding: [{ system: ROLE_CODE_SYSTEM, code: role, display: (ROLES as readonly string[]).includes(role) ? ROLE_LABELS[role as Role] : role }] }] }
      : {}),
    who: r.actor_user_id
      ? { identifier: { system: id("user"), value: r.actor_user_id }, ...(r.actor_email ? { display: r.actor_email } : {}) }
      : { display: r.actor_email ?? "Corvane (automatic job)" },
    requestor: true,
    // "2" = IP address (http://hl7.org/fhir/network-type).
    ...(r.client_address ? { network: { address: r.client_address, type: "2" as const } } : {}),
  };
}

function entitiesOf(r: AuditEventRow): AuditEventEntity[] {
  const out: AuditEventEntity[] = [];
  if (r.target_type && r.target_id) {
    const person = r.target_type === "user" || r.target_type === "account";
    out.push({
      what: { identifier: { system: id(r.target_type), value: r.target_id } },
      type: person ? { system: ENTITY_TYPE, code: "1", display: "Person" } : { system: ENTITY_TYPE, code: "2", display: "System Object" },
    });
  }
  if (r.unit_id) {
    out.push({ what: { identifier: { system: id("unit"), value: r.unit_id } }, type: { system: ENTITY_TYPE, code: "2", display: "System Object" } });
  }
  out.push({
    what: { identifier: { system: id("audit-entry"), value: String(r.seq) } },
    type: { system: ENTITY_TYPE, code: "2", display: "System Object" },
    detail: [
      { type: "detail", valueString: canonicalize(r.detail) ?? "{}" },
      ...(r.request_id ? [{ type: "request_id", valueString: r.request_id }] : []),
      { type: "prev_hash", valueString: r.prev_hash },
      { type: "hash", valueString: r.hash },
      { type: "chained-fields", valueString: canonicalJson(chainedFieldsOf(r)) },
    ],
  });
  return out;
}

export function toFhirAuditEvent(r: AuditEventRow): AuditEvent {
  const type = eventType(r.action);
  const subtype: Coding[] = [{ system: ACTION_CODE_SYSTEM, code: r.action }];
  if (r.action === "auth.sign_in") subtype.unshift(dcm("110122", "Login"));
  if (r.action === "auth.sign_out") subtype.unshift(dcm("110123", "Logout"));
  return {
    resourceType: "AuditEvent",
    id: String(r.seq),
    type,
    subtype,
    action: eventAction(r.action),
    recorded: r.occurred_at.toISOString(),
    outcome: OUTCOME_CODE[r.outcome],
    ...(r.outcome !== "success" ? { outcomeDesc: r.outcome === "denied" ? "Refused: not allowed for this person" : "Failed" } : {}),
    agent: [agentOf(r)],
    source: {
      observer: { display: "Corvane" },
      type: [{ system: SOURCE_TYPE, code: "4", display: "Application Server" }],
    },
    entity: entitiesOf(r),
  };
}

export const ndjsonRecord = (r: AuditEventRow) => `${JSON.stringify(toFhirAuditEvent(r))}\n`;
