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
  created_at: Date;
}
export type UnitInsert = Omit<UnitRow, "id" | "created_at">;

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
