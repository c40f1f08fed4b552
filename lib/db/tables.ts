// Table names, row types and insert types, registered with Knex so db("users") is typed end to end.
import type { Knex } from "knex";
import type { Role } from "@/lib/auth/roles";

export const UNITS = "units";
export const BEDS = "beds";
export const PATIENTS = "patients";
export const STAYS = "stays";
export const USERS = "users";
export const USER_UNIT_ROLES = "user_unit_roles";
export const AUDIT_EVENTS = "audit_events";

export type UnitKind = "adult" | "neonatal";

export interface UnitRow {
  id: string;
  code: string;
  name: string;
  kind: UnitKind;
  time_zone: string;
  /** Local "HH:MM" the unit's review night starts and ends (migrations/20261202000100_review.ts). */
  night_starts_at: string;
  night_ends_at: string;
  /** Review queue targets, minutes (migrations/20261202000300_review_queue.ts). */
  ack_target_minutes: number;
  remind_after_minutes: number;
  escalate_after_minutes: number;
  created_at: Date;
}
type UnitDefaults = "night_starts_at" | "night_ends_at" | "ack_target_minutes" | "remind_after_minutes" | "escalate_after_minutes";
export type UnitInsert = Omit<UnitRow, "id" | "created_at" | UnitDefaults> & Partial<Pick<UnitRow, UnitDefaults>>;

export interface BedRow {
  id: string;
  unit_id: string;
  label: string;
  sort_order: number;
  active: boolean;
}
export type BedInsert = Omit<BedRow, "id">;

export interface PatientRow {
  id: string;
  record_number: string;
  display_name: string;
  birth_date: string | null;
  created_at: Date;
}
export type PatientInsert = Omit<PatientRow, "id" | "created_at">;

export interface StayRow {
  id: string;
  patient_id: string;
  bed_id: string;
  admitted_at: Date;
  discharged_at: Date | null;
}
export type StayInsert = Omit<StayRow, "id">;

export interface UserRow {
  id: string;
  email: string;
  name: string;
  password_hash: string;
  active: boolean;
  last_sign_in_at: Date | null;
  created_at: Date;
  updated_at: Date;
}
export type UserInsert = Pick<UserRow, "email" | "name" | "password_hash"> & Partial<Pick<UserRow, "active">>;

export interface UserUnitRoleRow {
  user_id: string;
  unit_id: string;
  role: Role;
  granted_at: Date;
  granted_by: string | null;
}
export type UserUnitRoleInsert = Omit<UserUnitRoleRow, "granted_at">;

export type AuditOutcome = "success" | "failure" | "denied";

export interface AuditEventRow {
  seq: string; // bigint comes back from pg as a string
  occurred_at: Date;
  actor_user_id: string | null;
  actor_email: string | null;
  actor_role: string | null;
  action: string;
  target_type: string | null;
  target_id: string | null;
  unit_id: string | null;
  outcome: AuditOutcome;
  detail: Record<string, unknown>;
  request_id: string | null;
  client_address: string | null;
  prev_hash: string;
  hash: string;
}
export type AuditEventInsert = Omit<AuditEventRow, "seq"> & { seq: number | string };

declare module "knex/types/tables" {
  interface Tables {
    units: Knex.CompositeTableType<UnitRow, UnitInsert>;
    beds: Knex.CompositeTableType<BedRow, BedInsert>;
    patients: Knex.CompositeTableType<PatientRow, PatientInsert>;
    stays: Knex.CompositeTableType<StayRow, StayInsert, Partial<StayInsert>>;
    users: Knex.CompositeTableType<UserRow, UserInsert, Partial<Omit<UserRow, "id" | "created_at">>>;
    user_unit_roles: Knex.CompositeTableType<UserUnitRoleRow, UserUnitRoleInsert>;
    audit_events: Knex.CompositeTableType<AuditEventRow, AuditEventInsert, never>;
  }
}

// ---- live pipeline (migrations/20261201000300_live_pipeline.ts) ----
export const DEVICES = "devices";
export const DEVICE_ASSIGNMENTS = "device_assignments";
export const BEATS = "beats";
export const DEVICE_STREAM_STATUS = "device_stream_status";
export const INDEX_WINDOWS = "index_windows";
export const COMPUTATION_PARAMS = "computation_params";
export const BASELINES = "baselines";
export const RULE_SETS = "rule_sets";
export const FLAGS = "flags";
export const COMPUTE_RUNS = "compute_runs";

export const DEVICE_STATUSES = ["active", "maintenance", "decommissioned"] as const;
export type DeviceStatus = (typeof DEVICE_STATUSES)[number];
export interface DeviceRow {
  id: string;
  serial: string;
  model: string;
  manufacturer: string;
  firmware: string;
  /** RR (beat timestamp) resolution, ms. */
  timestamp_resolution_ms: number;
  stream_url: string;
  notes: string;
  /** Home unit (migrations/20261202000400_device_registry.ts). */
  unit_id: string;
  /** Null before a token is issued and after it is revoked. */
  stream_token_hash: string | null;
  stream_token_enc: string | null;
  /** When the current token was issued (first issue or rotation). */
  token_rotated_at: Date | null;
  previous_token_hash: string | null;
  previous_token_enc: string | null;
  previous_token_valid_until: Date | null;
  token_revoked_at: Date | null;
  status: DeviceStatus;
  registered_by: string | null;
  decommissioned_at: Date | null;
  decommissioned_by: string | null;
  decommission_reason: string | null;
  created_at: Date;
  updated_at: Date;
}
type DeviceOptional =
  | "token_rotated_at" | "status" | "manufacturer" | "notes" | "registered_by" | "previous_token_hash" | "previous_token_enc"
  | "previous_token_valid_until" | "token_revoked_at" | "decommissioned_at" | "decommissioned_by" | "decommission_reason"
  | "stream_token_hash" | "stream_token_enc";
export type DeviceInsert = Omit<DeviceRow, "id" | "created_at" | "updated_at" | DeviceOptional> & Partial<Pick<DeviceRow, DeviceOptional>>;

export interface DeviceAssignmentRow {
  id: string;
  device_id: string;
  bed_id: string;
  assigned_from: Date;
  assigned_to: Date | null;
  assigned_by: string | null;
  unassigned_by: string | null;
}
export type DeviceAssignmentInsert = Omit<DeviceAssignmentRow, "id" | "unassigned_by"> & { unassigned_by?: string | null };

export interface BeatRow {
  device_id: string;
  seq: string; // bigint
  beat_at: Date;
  device_time: Date;
  received_at: Date;
  rr_ms: number;
  beat_type: "N" | "V" | "S" | "P" | "?";
  quality: number;
  lead_off: boolean;
}
export type BeatInsert = Omit<BeatRow, "seq" | "received_at"> & { seq: number | string; received_at?: Date };

export interface DeviceStreamStatusRow {
  device_id: string;
  connected: boolean;
  last_seq: string | null;
  last_seen_at: Date | null;
  last_beat_at: Date | null;
  gaps: number;
  missing_seqs: string;
  duplicates: number;
  malformed: number;
  malformed_by_kind: Record<string, number>;
  reconnects: number;
  clock_offset_ms: number | null;
  lead_off: boolean;
  last_error: string | null;
  updated_at: Date;
}

export type WindowKind = "short" | "long";
export interface IndexWindowRow {
  id: string;
  stay_id: string;
  kind: WindowKind;
  window_start: Date;
  window_end: Date;
  algorithm_version: string;
  params_hash: string;
  grade: "good" | "limited" | "unusable";
  quality: Record<string, unknown>;
  values: Record<string, number | null> | null;
  reasons: Record<string, string>;
  mse: (number | null)[] | null;
  baseline_delta: Record<string, number | null> | null;
  compute_run_id: string | null;
  computed_at: Date;
  /** Generated from values.hr (migrations/20261202000200_window_hr.ts); never written. */
  hr: number | null;
}
export type IndexWindowInsert = Omit<IndexWindowRow, "id" | "computed_at" | "hr">;

export interface BaselineRow {
  stay_id: string;
  index_key: string;
  algorithm_version: string;
  median: number | null;
  spread: number | null;
  n_windows: number;
  from_at: Date;
  to_at: Date;
  computed_at: Date;
}

export interface RuleSetRow {
  id: string;
  unit_id: string;
  version: number;
  name: string;
  rules: unknown;
  is_default: boolean;
  note: string | null;
  created_by: string | null;
  created_at: Date;
}

export type FlagState = "open" | "acknowledged" | "escalated" | "resolved";
export interface FlagRow {
  id: string;
  stay_id: string;
  unit_id: string;
  rule_set_id: string;
  rule_set_version: number;
  rule_id: string;
  severity: "watch" | "review";
  state: FlagState;
  condition_from: Date;
  condition_to: Date | null;
  raised_at: Date;
  previous_flag_id: string | null;
  details: Record<string, unknown>;
  /** Bumped by every transition (optimistic concurrency). */
  version: number;
}

export interface ComputeRunRow {
  id: string;
  started_at: Date;
  finished_at: Date | null;
  algorithm_version: string;
  trigger: "scheduler" | "admin" | "test";
  status: "running" | "done" | "failed" | "skipped";
  stays: number;
  windows: number;
  flags_raised: number;
  duration_ms: number | null;
  error: string | null;
}

declare module "knex/types/tables" {
  interface Tables {
    devices: Knex.CompositeTableType<DeviceRow, DeviceInsert, Partial<Omit<DeviceRow, "id" | "created_at">>>;
    device_assignments: Knex.CompositeTableType<DeviceAssignmentRow, DeviceAssignmentInsert, Partial<DeviceAssignmentInsert>>;
    beats: Knex.CompositeTableType<BeatRow, BeatInsert, never>;
    device_stream_status: Knex.CompositeTableType<DeviceStreamStatusRow, Partial<DeviceStreamStatusRow> & { device_id: string }, Partial<DeviceStreamStatusRow>>;
    index_windows: Knex.CompositeTableType<IndexWindowRow, IndexWindowInsert, Partial<IndexWindowInsert>>;
    baselines: Knex.CompositeTableType<BaselineRow, Omit<BaselineRow, "computed_at">, Partial<BaselineRow>>;
    rule_sets: Knex.CompositeTableType<RuleSetRow, Omit<RuleSetRow, "id" | "created_at" | "is_default" | "note"> & Partial<Pick<RuleSetRow, "is_default" | "note">>, never>;
    flags: Knex.CompositeTableType<FlagRow, Omit<FlagRow, "id" | "raised_at" | "state" | "previous_flag_id" | "details" | "version"> & Partial<Pick<FlagRow, "state" | "previous_flag_id" | "details" | "raised_at" | "version">>, Partial<FlagRow>>;
    compute_runs: Knex.CompositeTableType<ComputeRunRow, Pick<ComputeRunRow, "algorithm_version" | "trigger"> & Partial<ComputeRunRow>, Partial<ComputeRunRow>>;
  }
}

// ---- clinician review (migrations/20261202000100_review.ts) ----

export const ANNOTATION_KINDS = ["medication", "procedure", "repositioning", "other"] as const;
export type AnnotationKind = (typeof ANNOTATION_KINDS)[number];

export interface ClinicalAnnotationRow {
  id: string;
  stay_id: string;
  occurred_at: Date;
  kind: AnnotationKind;
  note: string;
  created_by: string;
  created_at: Date;
  updated_by: string | null;
  updated_at: Date | null;
  version: number;
}

export interface HandoffNoteRow {
  id: string;
  stay_id: string;
  /** "YYYY-MM-DD" (node-pg returns a date column as a Date unless told otherwise; repositories format it). */
  night: string | Date;
  note: string;
  updated_by: string;
  updated_at: Date;
  version: number;
}

declare module "knex/types/tables" {
  interface Tables {
    clinical_annotations: Knex.CompositeTableType<
      ClinicalAnnotationRow,
      Pick<ClinicalAnnotationRow, "stay_id" | "occurred_at" | "kind" | "note" | "created_by">,
      Partial<Pick<ClinicalAnnotationRow, "occurred_at" | "kind" | "note" | "updated_by" | "updated_at" | "version">>
    >;
    handoff_notes: Knex.CompositeTableType<
      HandoffNoteRow,
      Pick<HandoffNoteRow, "stay_id" | "night" | "note" | "updated_by">,
      Partial<Pick<HandoffNoteRow, "note" | "updated_by" | "updated_at" | "version">>
    >;
  }
}

// ---- review queue and e-mail (migrations/20261202000300_review_queue.ts) ----

export const ACK_REASONS = ["artifact_or_poor_signal", "known_rhythm", "expected_clinical_context", "reviewed_no_action"] as const;
export type AckReason = (typeof ACK_REASONS)[number];

export interface FlagEventRow {
  id: string;
  flag_id: string;
  from_state: FlagState;
  to_state: FlagState;
  reason: AckReason | null;
  note: string | null;
  recipient_id: string | null;
  actor_id: string | null;
  at: Date;
}

export type MailKind = "escalation" | "reminder" | "reminder_escalation";
export interface MailOutboxRow {
  id: string;
  kind: MailKind;
  to_address: string;
  subject: string;
  body_text: string;
  dedupe_key: string;
  flag_id: string | null;
  status: "queued" | "sent" | "failed";
  attempts: number;
  next_attempt_at: Date;
  last_error: string | null;
  created_at: Date;
  sent_at: Date | null;
}

export interface MailReceivedRow {
  id: string;
  received_at: Date;
  envelope_from: string | null;
  envelope_to: string[];
  subject: string | null;
  body_text: string | null;
  message_id: string | null;
  raw: string;
}

declare module "knex/types/tables" {
  interface Tables {
    flag_events: Knex.CompositeTableType<FlagEventRow, Omit<FlagEventRow, "id" | "at"> & Partial<Pick<FlagEventRow, "at">>, never>;
    mail_outbox: Knex.CompositeTableType<
      MailOutboxRow,
      Pick<MailOutboxRow, "kind" | "to_address" | "subject" | "body_text" | "dedupe_key"> & Partial<Pick<MailOutboxRow, "flag_id" | "next_attempt_at">>,
      Partial<Pick<MailOutboxRow, "status" | "attempts" | "next_attempt_at" | "last_error" | "sent_at">>
    >;
    mail_received: Knex.CompositeTableType<MailReceivedRow, Omit<MailReceivedRow, "id" | "received_at">, never>;
  }
}

// ---- device registry (migrations/20261202000400_device_registry.ts) ----

export const DEVICE_HEALTH_MINUTES = "device_health_minutes";
export const DEVICE_MAINTENANCE = "device_maintenance";
export const DEVICE_ATTACHMENTS = "device_attachments";
export const DEVICE_IMPORT_BATCHES = "device_import_batches";

export interface DeviceHealthMinuteRow {
  device_id: string;
  /** Start of the UTC minute. */
  minute: Date;
  beats: number;
  gaps: number;
  missing_seqs: string; // bigint
  duplicates: number;
  malformed: number;
  reconnects: number;
  clock_offset_ms: number | null;
  connected: boolean;
  /** Longest interval between consecutive stored beat times made by the beats stored in the minute, ms. */
  longest_gap_ms: number | null;
}

export const MAINTENANCE_KINDS = ["preventive", "repair", "firmware_update"] as const;
export type MaintenanceKind = (typeof MAINTENANCE_KINDS)[number];
export interface DeviceMaintenanceRow {
  id: string;
  device_id: string;
  kind: MaintenanceKind;
  /** A calendar date (PostgreSQL date, read as "YYYY-MM-DD" text). */
  performed_on: string;
  performed_by_name: string;
  note: string;
  firmware_before: string | null;
  firmware_after: string | null;
  next_due_on: string | null;
  recorded_by: string | null;
  recorded_at: Date;
}

export const ATTACHMENT_TYPES = ["application/pdf", "image/png", "image/jpeg"] as const;
export type AttachmentType = (typeof ATTACHMENT_TYPES)[number];
export interface DeviceAttachmentRow {
  id: string;
  maintenance_id: string;
  file_name: string;
  content_type: AttachmentType;
  size_bytes: number;
  sha256: string;
  content: Buffer;
  uploaded_by: string | null;
  uploaded_at: Date;
}

export interface DeviceImportBatchRow {
  id: string;
  unit_id: string;
  file_name: string;
  sha256: string;
  rows: unknown;
  status: "previewed" | "imported" | "failed";
  created_by: string | null;
  created_at: Date;
  confirmed_at: Date | null;
}

declare module "knex/types/tables" {
  interface Tables {
    device_health_minutes: Knex.CompositeTableType<DeviceHealthMinuteRow, Partial<DeviceHealthMinuteRow> & Pick<DeviceHealthMinuteRow, "device_id" | "minute">, Partial<DeviceHealthMinuteRow>>;
    device_maintenance: Knex.CompositeTableType<DeviceMaintenanceRow, Omit<DeviceMaintenanceRow, "id" | "recorded_at" | "note" | "firmware_before" | "firmware_after" | "next_due_on"> & Partial<Pick<DeviceMaintenanceRow, "note" | "firmware_before" | "firmware_after" | "next_due_on">>, never>;
    device_attachments: Knex.CompositeTableType<DeviceAttachmentRow, Omit<DeviceAttachmentRow, "id" | "uploaded_at">, never>;
    device_import_batches: Knex.CompositeTableType<DeviceImportBatchRow, Pick<DeviceImportBatchRow, "unit_id" | "file_name" | "sha256" | "rows" | "created_by">, Partial<Pick<DeviceImportBatchRow, "status" | "confirmed_at" | "rows">>>;
  }
}
