// Seeds an invented maintenance history for the demo devices (after 01_demo.ts), idempotently: a device that has any
// maintenance entry is left alone, so a second run inserts nothing and a person's own entries are never touched.
// Dates are relative to the day of seeding, so the demo always shows some devices overdue and some due soon, and every
// unit has one entry with a small PDF attachment (the role × route matrix downloads one per unit).
import type { Knex } from "knex";
import { formatInTimeZone } from "date-fns-tz";
import { checkAttachments, insertAttachment } from "@/lib/devices/attachments";
import type { MaintenanceKind } from "@/lib/db/tables";
import { bedLabel, DEMO_DEVICE_MODEL, DEMO_TIME_ZONE, DEMO_UNITS, demoDeviceSerial, demoPerson } from "./demo-data";
import { auditSeed } from "./seed-audit";

const DAY = 86_400_000;

interface PlannedEntry {
  bed: number;
  kind: MaintenanceKind;
  /** Days before seeding that the work was done. */
  daysAgo: number;
  /** The next due date this entry sets, in days after the work; none for an entry that sets none. */
  dueAfterDays?: number;
  performedBy: string;
  note: string;
  /** Firmware update only: the version it replaced (the new one is the device's current version). */
  firmwareBefore?: string;
  /** With a "Service report (fictional)" PDF. */
  withReport?: boolean;
}

const IN_HOUSE = "Jules Marchetti, Clinical Engineering (fictional)";
const FIELD_SERVICE = "Field service, Larkspur Vitals Group (fictional)";

/** Per unit: what was done to which bed's device. Days until due = dueAfterDays − daysAgo. */
const DEMO_MAINTENANCE: Record<string, PlannedEntry[]> = {
  "4W": [
    // Due in 25 days, with the unit's service report.
    { bed: 1, kind: "preventive", daysAgo: 340, dueAfterDays: 365, performedBy: FIELD_SERVICE, withReport: true,
      note: "Annual preventive maintenance: electrical safety test passed, ECG lead set replaced, clock checked against the network time server." },
    // Overdue by 20 days.
    { bed: 2, kind: "preventive", daysAgo: 200, dueAfterDays: 180, performedBy: IN_HOUSE,
      note: "Six-month check after a cable fault; connector and strain relief inspected, no findings." },
    // A firmware update after a preventive check; the check's due date (in 85 days) still holds.
    { bed: 3, kind: "preventive", daysAgo: 280, dueAfterDays: 365, performedBy: FIELD_SERVICE,
      note: "Annual preventive maintenance, no findings." },
    { bed: 3, kind: "firmware_update", daysAgo: 120, firmwareBefore: "2.3.7", performedBy: IN_HOUSE,
      note: "Firmware update from the manufacturer's fictional release notes: corrected beat timestamp rounding." },
    // Two checks; the latest sets the due date (in 70 days).
    { bed: 4, kind: "preventive", daysAgo: 300, dueAfterDays: 180, performedBy: IN_HOUSE, note: "Six-month check, no findings." },
    { bed: 4, kind: "preventive", daysAgo: 110, dueAfterDays: 180, performedBy: IN_HOUSE, note: "Six-month check, battery replaced." },
    // Overdue by 10 days; a repair since then set no new date.
    { bed: 5, kind: "preventive", daysAgo: 250, dueAfterDays: 240, performedBy: FIELD_SERVICE, note: "Preventive maintenance, no findings." },
    { bed: 5, kind: "repair", daysAgo: 45, performedBy: IN_HOUSE, note: "Cracked housing clip replaced; function check passed." },
    // Due in 10 days.
    { bed: 7, kind: "preventive", daysAgo: 355, dueAfterDays: 365, performedBy: FIELD_SERVICE, note: "Annual preventive maintenance, no findings." },
  ],
  "2E": [
    // Due in 15 days, with the unit's service report.
    { bed: 1, kind: "preventive", daysAgo: 350, dueAfterDays: 365, performedBy: FIELD_SERVICE, withReport: true,
      note: "Annual preventive maintenance: electrical safety test passed, neonatal sensor adapter replaced." },
    // Overdue by 30 days.
    { bed: 2, kind: "preventive", daysAgo: 300, dueAfterDays: 270, performedBy: IN_HOUSE, note: "Nine-month check, no findings." },
    // Due in 305 days.
    { bed: 3, kind: "preventive", daysAgo: 60, dueAfterDays: 365, performedBy: FIELD_SERVICE, note: "Annual preventive maintenance, no findings." },
  ],
};

/**
 * A one-page PDF (ISO 32000-1): header, five objects, cross-reference table with 20-byte entries (§7.5.4), trailer,
 * startxref and %%EOF (§7.5.5), Helvetica being one of the standard 14 fonts (§9.6.2.2). ASCII text only.
 */
export function serviceReportPdf(lines: string[]): Buffer {
  const esc = (s: string) => s.replace(/[^\x20-\x7e]/g, "?").replace(/[\\()]/g, "\\$&");
  const text = lines.map((l, i) => `BT /F1 ${i === 0 ? 16 : 11} Tf 72 ${720 - i * 22} Td (${esc(l)}) Tj ET`).join("\n");
  const objects = [
    "<< /Type /Catalog /Pages 2 0 R >>",
    "<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
    "<< /Type /Page /Parent 2 0 R /MediaBox [0 0 612 792] /Resources << /Font << /F1 4 0 R >> >> /Contents 5 0 R >>",
    "<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>",
    `<< /Length ${text.length} >>\nstream\n${text}\nendstream`,
  ];
  let out = "%PDF-1.4\n";
  const offsets: number[] = [];
  objects.forEach((o, i) => {
    offsets.push(out.length);
    out += `${i + 1} 0 obj\n${o}\nendobj\n`;
  });
  const xref = out.length;
  out += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n${offsets.map((o) => `${String(o).padStart(10, "0")} 00000 n \n`).join("")}`;
  out += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(out, "latin1");
}

const localDay = (instant: number) => formatInTimeZone(instant, DEMO_TIME_ZONE, "yyyy-MM-dd");
const addDays = (day: string, n: number) => new Date(Date.parse(`${day}T00:00:00Z`) + n * DAY).toISOString().slice(0, 10);

export async function seedDeviceMaintenance(knex: Knex, now: Date = new Date()): Promise<{ inserted: { entries: number; attachments: number } }> {
  const inserted = { entries: 0, attachments: 0 };
  await knex.transaction(async (trx) => {
    const recorder = await trx("users").whereRaw("lower(email) = lower(?)", [demoPerson("biomed").email]).first("id");
    for (const unit of DEMO_UNITS) {
      const plan = DEMO_MAINTENANCE[unit.code] ?? [];
      for (const bed of new Set(plan.map((p) => p.bed))) {
        const serial = demoDeviceSerial(bedLabel(unit.bedPrefix, bed));
        // Locked, so a concurrent second seed waits here and then finds the entries.
        const device = await trx("devices").where({ serial }).forUpdate().first("id", "firmware");
        if (!device) continue;
        if (await trx("device_maintenance").where({ device_id: device.id }).first("id")) continue;
        for (const p of plan.filter((x) => x.bed === bed)) {
          const performedOn = localDay(now.getTime() - p.daysAgo * DAY);
          const [entry] = await trx("device_maintenance")
            .insert({
              device_id: device.id,
              kind: p.kind,
              performed_on: performedOn,
              performed_by_name: p.performedBy,
              note: p.note,
              firmware_before: p.kind === "firmware_update" ? p.firmwareBefore ?? null : null,
              firmware_after: p.kind === "firmware_update" ? device.firmware : null,
              next_due_on: p.dueAfterDays === undefined ? null : addDays(performedOn, p.dueAfterDays),
              recorded_by: recorder?.id ?? null,
            })
            .returning("id");
          inserted.entries += 1;
          if (!p.withReport) continue;
          const pdf = serviceReportPdf([
            "Service report (fictional)",
            `Device ${serial} - ${DEMO_DEVICE_MODEL}`,
            `Preventive maintenance performed on ${performedOn} by ${p.performedBy}`,
            "Electrical safety test: passed. Function check: passed.",
            "Invented demo document for Corvane; not a real service record.",
          ]);
          // Through the same checks as an upload, so the demo file is one Corvane itself would accept.
          const checked = await checkAttachments([new File([new Uint8Array(pdf)], `Service report (fictional) ${serial}.pdf`)]);
          if (!checked.ok) throw new Error(`demo service report refused: ${checked.messages.join(" ")}`);
          await insertAttachment(trx, entry!.id, checked.attachments[0]!, recorder?.id ?? null);
          inserted.attachments += 1;
        }
      }
    }
    if (inserted.entries > 0) {
      await auditSeed(trx, "demo.seed.maintenance", { inserted });
    }
  });
  return { inserted };
}
