// The import file's columns explained with example values, and the template built from the same examples.
import { csvQuote } from "@/lib/csv";
import { IMPORT_COLUMNS, type ImportColumn } from "@/lib/devices/import.validation";

export const IMPORT_COLUMN_GUIDE: Record<ImportColumn, { what: string; required: boolean; example: string; second: string }> = {
  serial: { what: "As printed on the device label: letters, digits and dashes, up to 64 characters. Unique across Corvane (compared without case).", required: true, example: "QF-0412", second: "QF-0413" },
  manufacturer: { what: "Up to 120 characters.", required: true, example: "Quillfeather Instruments (fictional)", second: "Quillfeather Instruments (fictional)" },
  model: { what: "Up to 120 characters.", required: true, example: "QF-9 bedside ECG (fictional)", second: "QF-9 bedside ECG (fictional)" },
  firmware: { what: "Firmware version, up to 40 characters.", required: true, example: "1.0.3", second: "1.0.3" },
  rr_resolution_ms: { what: "Timestamp resolution of the beat intervals in milliseconds: more than 0, at most 20. A dot for decimals.", required: true, example: "7.8125", second: "4" },
  stream_url: { what: "The device's stream address, starting with http:// or https://.", required: true, example: "http://192.0.2.41/stream", second: "http://192.0.2.42/stream" },
  notes: { what: "Free text, up to 2,000 characters. The column may be left out.", required: false, example: "Spare, store room B", second: "Back from repair, see service report" },
};

const line = (pick: "example" | "second") => IMPORT_COLUMNS.map((c) => csvQuote(IMPORT_COLUMN_GUIDE[c][pick])).join(",");
/** The template offered for download: the header and two example rows (the integration test imports it). */
export const IMPORT_TEMPLATE_CSV = [IMPORT_COLUMNS.join(","), line("example"), line("second")].join("\r\n") + "\r\n";
