// The invented demo scenario: a fictional hospital, units, beds, patients and people. Nothing here is real.
// Seeds build from these constants and tests import them, so both agree on what the demo holds.
import type { Role } from "@/lib/auth/roles";
import type { UnitKind } from "@/lib/db/tables";

export const DEMO_HOSPITAL = "Larkspur Valley General (fictional)";
export const DEMO_PASSWORD = "corvane-demo-night";
export const DEMO_TIME_ZONE = "America/New_York";

export interface DemoUnit {
  code: string;
  name: string;
  kind: UnitKind;
  bedPrefix: string;
}

export const DEMO_UNITS: DemoUnit[] = [
  { code: "4W", name: "4 West Step-Down", kind: "adult", bedPrefix: "4W" },
  { code: "2E", name: "2 East Neonatal", kind: "neonatal", bedPrefix: "2E" },
];
export const BEDS_PER_UNIT = 12;
export const bedLabel = (prefix: string, n: number) => `${prefix}-${String(n).padStart(2, "0")}`;

export interface DemoStay {
  recordNumber: string;
  displayName: string;
  birthDate: string;
  unitCode: string;
  bed: number;
  /** Hours before seeding that the stay began; `dischargedHoursAgo` set for a finished stay. */
  admittedHoursAgo: number;
  dischargedHoursAgo?: number;
}

export const DEMO_STAYS: DemoStay[] = [
  { recordNumber: "DEMO-40117", displayName: "Tillery, Rowan", birthDate: "1951-03-08", unitCode: "4W", bed: 1, admittedHoursAgo: 52 },
  { recordNumber: "DEMO-40122", displayName: "Brinkwater, Odessa", birthDate: "1963-11-21", unitCode: "4W", bed: 2, admittedHoursAgo: 30 },
  { recordNumber: "DEMO-40135", displayName: "Quillan, Marcus", birthDate: "1947-06-14", unitCode: "4W", bed: 3, admittedHoursAgo: 75 },
  { recordNumber: "DEMO-40141", displayName: "Vasquez-Thorne, Ines", birthDate: "1972-01-30", unitCode: "4W", bed: 5, admittedHoursAgo: 11 },
  { recordNumber: "DEMO-40158", displayName: "Abernathy, Clement", birthDate: "1958-09-02", unitCode: "4W", bed: 6, admittedHoursAgo: 98 },
  { recordNumber: "DEMO-40163", displayName: "Oyelaran, Funmi", birthDate: "1969-04-17", unitCode: "4W", bed: 7, admittedHoursAgo: 20 },
  { recordNumber: "DEMO-40179", displayName: "Lindqvist, Harald", birthDate: "1944-12-05", unitCode: "4W", bed: 9, admittedHoursAgo: 40 },
  { recordNumber: "DEMO-40184", displayName: "Castellane, Mira", birthDate: "1980-07-23", unitCode: "4W", bed: 10, admittedHoursAgo: 6 },
  { recordNumber: "DEMO-40196", displayName: "Pemberton, Josiah", birthDate: "1955-02-11", unitCode: "4W", bed: 12, admittedHoursAgo: 63 },
  { recordNumber: "DEMO-40102", displayName: "Harrow, Eleanor", birthDate: "1949-08-19", unitCode: "4W", bed: 4, admittedHoursAgo: 120, dischargedHoursAgo: 26 },
  { recordNumber: "DEMO-40108", displayName: "Dunmore, Felix", birthDate: "1966-05-27", unitCode: "4W", bed: 8, admittedHoursAgo: 90, dischargedHoursAgo: 14 },
  { recordNumber: "DEMO-20311", displayName: "Baby Girl Fenwick", birthDate: "2026-11-24", unitCode: "2E", bed: 1, admittedHoursAgo: 170 },
  { recordNumber: "DEMO-20318", displayName: "Baby Boy Ashgrove A", birthDate: "2026-11-28", unitCode: "2E", bed: 2, admittedHoursAgo: 80 },
  { recordNumber: "DEMO-20319", displayName: "Baby Boy Ashgrove B", birthDate: "2026-11-28", unitCode: "2E", bed: 3, admittedHoursAgo: 80 },
  { recordNumber: "DEMO-20324", displayName: "Baby Girl Okafor-Lind", birthDate: "2026-11-15", unitCode: "2E", bed: 5, admittedHoursAgo: 380 },
  { recordNumber: "DEMO-20330", displayName: "Baby Boy Marchbank", birthDate: "2026-11-30", unitCode: "2E", bed: 6, admittedHoursAgo: 22 },
  { recordNumber: "DEMO-20337", displayName: "Baby Girl Esterhaz", birthDate: "2026-11-20", unitCode: "2E", bed: 8, admittedHoursAgo: 260 },
  { recordNumber: "DEMO-20342", displayName: "Baby Boy Whitlock", birthDate: "2026-11-29", unitCode: "2E", bed: 11, admittedHoursAgo: 44 },
  { recordNumber: "DEMO-20305", displayName: "Baby Girl Penhallow", birthDate: "2026-11-10", unitCode: "2E", bed: 9, admittedHoursAgo: 400, dischargedHoursAgo: 30 },
];

export interface DemoPerson {
  email: string;
  name: string;
  label: string;
  grants: { unitCode: string; role: Role }[];
}

export const DEMO_PEOPLE: DemoPerson[] = [
  { email: "admin@larkspur.example", name: "Morgan Ellery", label: "administrator, both units",
    grants: [{ unitCode: "4W", role: "admin" }, { unitCode: "2E", role: "admin" }] },
  { email: "clinician@larkspur.example", name: "Dr. Priya Halvorsen", label: "clinician, 4 West",
    grants: [{ unitCode: "4W", role: "clinician" }] },
  { email: "charge.nurse@larkspur.example", name: "Sam Okonkwo-Reyes", label: "charge nurse, 4 West",
    grants: [{ unitCode: "4W", role: "charge_nurse" }] },
  { email: "biomed@larkspur.example", name: "Jules Marchetti", label: "biomedical engineer, both units",
    grants: [{ unitCode: "4W", role: "biomed" }, { unitCode: "2E", role: "biomed" }] },
  { email: "quality@larkspur.example", name: "Dana Whitcombe", label: "quality officer, both units",
    grants: [{ unitCode: "4W", role: "quality" }, { unitCode: "2E", role: "quality" }] },
];

export const demoPerson = (role: Role): DemoPerson => {
  const p = DEMO_PEOPLE.find((x) => x.grants.some((g) => g.role === role));
  if (!p) throw new Error(`no demo person holds ${role}`);
  return p;
};

/** What each demo bed's simulated device streams (DOMAIN §6 recipe). Every bed has a device, occupied or not. */
export type DemoScenario =
  | "healthy_sleep"
  | "complexity_loss_rigid"
  | "complexity_loss_decorrelated"
  | "af_episodes"
  | "paced"
  | "ectopy"
  | "artefacts"
  | "dropouts_clock_drift"
  | "nicu"
  | "nicu_presepsis";

export const DEMO_BED_SCENARIOS: Record<string, DemoScenario> = {
  "4W-01": "healthy_sleep",
  "4W-02": "complexity_loss_rigid",
  "4W-03": "af_episodes",
  "4W-04": "healthy_sleep",
  "4W-05": "ectopy",
  "4W-06": "complexity_loss_decorrelated",
  "4W-07": "artefacts",
  "4W-08": "healthy_sleep",
  "4W-09": "paced",
  "4W-10": "dropouts_clock_drift",
  "4W-11": "healthy_sleep",
  "4W-12": "healthy_sleep",
  "2E-01": "nicu",
  "2E-02": "nicu_presepsis",
  "2E-03": "nicu",
  "2E-04": "nicu",
  "2E-05": "nicu",
  "2E-06": "nicu_presepsis",
  "2E-07": "nicu",
  "2E-08": "nicu",
  "2E-09": "nicu",
  "2E-10": "nicu",
  "2E-11": "nicu",
  "2E-12": "nicu",
};

export const DEMO_DEVICE_MODEL = "Larkspur demo monitor LM-2 (fictional)";
export const DEMO_DEVICE_FIRMWARE = "2.4.1";
export const DEMO_DEVICE_MANUFACTURER = "Larkspur Vitals Group (fictional)";
/** The device at bed "4W-01" is "LVG-4W-01". */
export const demoDeviceSerial = (bed: string) => `LVG-${bed}`;
/** Where the device simulator serves each device's stream. */
export const simulatorStreamUrl = (port: number, serial: string) => `http://127.0.0.1:${port}/devices/${serial}/stream`;
export const DEFAULT_SIMULATOR_PORT = 3200;
/** Demo devices are assigned to their beds from this many hours before seeding (covers the backfilled night). */
export const DEMO_ASSIGNED_HOURS_AGO = 72;
