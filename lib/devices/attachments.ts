// Service reports attached to maintenance entries, checked before anything is stored: not empty, not too large, a
// PDF, PNG or JPEG by its content (never by its name or the browser's claim) and complete, so a renamed program or a
// text file called "report.pdf" is refused with a message saying what it is. Accepted files are stored in
// PostgreSQL (device_attachments.content), never on disk, and served only through the guarded download route.
import { createHash } from "node:crypto";
import { fileTypeFromBuffer } from "file-type";
import type { Knex } from "knex";
import type { AttachmentType } from "@/lib/db/tables";

/** Per file. next.config.ts allows 9 MB server-action bodies, so one full-size file and the form fields fit. */
export const MAX_ATTACHMENT_BYTES = 8 * 1024 * 1024;
/** All files of one entry together: one request body carries them all, and it is capped at 9 MB. */
export const MAX_ENTRY_UPLOAD_BYTES = MAX_ATTACHMENT_BYTES;
const MAX_FILE_NAME_CHARS = 120;

/** The accepted types as people name them. */
export const ATTACHMENT_TYPE_WORDS: Record<AttachmentType, string> = { "application/pdf": "PDF", "image/png": "PNG image", "image/jpeg": "JPEG image" };
const EXTENSIONS: Record<AttachmentType, readonly string[]> = {
  "application/pdf": [".pdf"],
  "image/png": [".png"],
  "image/jpeg": [".jpg", ".jpeg"],
};
const ALL_EXTENSIONS = Object.values(EXTENSIONS).flat();

/** What people call the types that are most often uploaded by mistake; others are named by extension and MIME type. */
const OTHER_TYPE_WORDS: Record<string, string> = {
  exe: "a Windows program",
  elf: "a Linux program",
  macho: "a macOS program",
  zip: "a ZIP archive",
  "7z": "a 7-Zip archive",
  rar: "a RAR archive",
  gz: "a gzip archive",
  gif: "a GIF image",
  webp: "a WebP image",
  tif: "a TIFF image",
  bmp: "a BMP image",
  heic: "a HEIC photo",
  docx: "a Word document",
  xlsx: "an Excel workbook",
  cfb: "an older Office document",
  mp4: "an MP4 video",
};

export interface CheckedAttachment {
  fileName: string;
  contentType: AttachmentType;
  sizeBytes: number;
  /** Lower-case hex SHA-256 of the content (FIPS 180-4), recorded in the audit trail. */
  sha256: string;
  content: Buffer;
}

/** Stores a checked file under its maintenance entry, in the caller's transaction. */
export async function insertAttachment(trx: Knex.Transaction, maintenanceId: string, a: CheckedAttachment, uploadedBy: string | null): Promise<void> {
  await trx("device_attachments").insert({
    maintenance_id: maintenanceId,
    file_name: a.fileName,
    content_type: a.contentType,
    size_bytes: a.sizeBytes,
    sha256: a.sha256,
    content: a.content,
    uploaded_by: uploadedBy,
  });
}

export type AttachmentsCheck = { ok: true; attachments: CheckedAttachment[] } | { ok: false; messages: string[] };

/** e.g. "812 bytes", "14.2 KB", "8 MB" (binary multiples, as file managers show them). */
export function formatBytes(n: number): string {
  if (n < 1024) return `${n} byte${n === 1 ? "" : "s"}`;
  const [value, unit] = n < 1024 * 1024 ? [n / 1024, "KB"] : [n / (1024 * 1024), "MB"];
  return `${value.toFixed(1).replace(/\.0$/, "")} ${unit}`;
}

/**
 * A file name safe to show and to offer as a download name: no folders, no control or invisible formatting
 * characters (a right-to-left override could make "report‮fdp.exe" read as "report.exe.pdf"), no characters that
 * Windows refuses, at most 120 characters, and — given the detected type — an extension that matches the content.
 */
export function safeFileName(raw: string, contentType?: AttachmentType): string {
  let name = raw.normalize("NFC").split(/[\\/]/).pop() ?? "";
  name = name
    .replace(/[\p{Cc}\p{Cf}\p{Zl}\p{Zp}]/gu, "")
    .replace(/[<>:"|?*]/g, "_")
    .replace(/\s+/g, " ")
    .trim()
    .replace(/^\.+/, "")
    .trim();
  if (contentType) {
    const lower = name.toLowerCase();
    if (!EXTENSIONS[contentType].some((e) => lower.endsWith(e))) {
      const wrong = ALL_EXTENSIONS.find((e) => lower.endsWith(e));
      name = (wrong ? name.slice(0, -wrong.length) : name) + EXTENSIONS[contentType][0];
    }
  }
  const chars = Array.from(name);
  if (chars.length > MAX_FILE_NAME_CHARS) {
    const dot = name.lastIndexOf(".");
    const ext = dot > 0 && name.length - dot <= 6 ? Array.from(name.slice(dot)) : [];
    name = chars.slice(0, MAX_FILE_NAME_CHARS - ext.length - 1).join("") + "…" + ext.join("");
  }
  if (name === "" || (contentType && EXTENSIONS[contentType].includes(name.toLowerCase()))) {
    return `attachment${contentType ? EXTENSIONS[contentType][0] : ""}`;
  }
  return name;
}

/**
 * The PDF file trailer ends with a line holding only "%%EOF" (ISO 32000-1 §7.5.5). Readers look for it near the end
 * of the file rather than at the very last byte (common practice: within the last 1024 bytes).
 */
function pdfComplete(b: Buffer): boolean {
  return b.subarray(Math.max(0, b.length - 1024)).includes("%%EOF", 0, "latin1");
}

/**
 * A PNG datastream is the signature, IHDR as the first chunk and IEND as the last (PNG spec, ISO/IEC 15948, §5.2,
 * §5.6, §11.2.2, §11.2.5); each chunk is length (4 bytes), type (4), data, CRC (4) (§5.3).
 */
function pngComplete(b: Buffer): boolean {
  let at = 8;
  for (let first = true; at + 12 <= b.length; first = false) {
    const length = b.readUInt32BE(at);
    const type = b.toString("latin1", at + 4, at + 8);
    if (first && type !== "IHDR") return false;
    at += 12 + length;
    if (at > b.length) return false;
    if (type === "IEND") return true;
  }
  return false;
}

/**
 * A JPEG is SOI (FF D8), marker segments, a scan (SOS, FF DA) and EOI (FF D9) (ITU-T T.81 Annex B, Table B.1).
 * Segments before the scan carry their own length (B.1.1.4); inside entropy-coded data every FF byte is followed by
 * 00 or a restart marker (B.1.1.5), so an FF D9 after the first SOS can only be the EOI. Bytes after the EOI (some
 * cameras append data there) are allowed.
 */
function jpegComplete(b: Buffer): boolean {
  let at = 2;
  while (at + 4 <= b.length) {
    if (b[at] !== 0xff) return false;
    const marker = b[at + 1]!;
    if (marker === 0xff) {
      at += 1; // fill byte (B.1.1.2)
      continue;
    }
    if (marker === 0xd9) return false; // EOI before any scan: no image
    if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) {
      at += 2; // markers without a length (TEM, RSTn)
      continue;
    }
    const length = b.readUInt16BE(at + 2);
    if (length < 2) return false;
    if (marker === 0xda) return b.indexOf(Buffer.from([0xff, 0xd9]), at + 2 + length) !== -1;
    at += 2 + length;
  }
  return false;
}

const COMPLETE: Record<AttachmentType, (b: Buffer) => boolean> = {
  "application/pdf": pdfComplete,
  "image/png": pngComplete,
  "image/jpeg": jpegComplete,
};

/** Text has no NUL bytes and decodes as UTF-8 (ASCII included); a cut-off character at the sample's end is fine. */
function looksLikeText(b: Buffer): boolean {
  const sample = b.subarray(0, 4096);
  if (sample.includes(0)) return false;
  try {
    new TextDecoder("utf-8", { fatal: true }).decode(sample, { stream: true });
    return true;
  } catch {
    return false;
  }
}

const isAccepted = (mime: string): mime is AttachmentType => mime in ATTACHMENT_TYPE_WORDS;

/**
 * The leading bytes of the accepted types: PDF "%PDF-" (ISO 32000-1 §7.5.2), the PNG signature 89 50 4E 47 0D 0A 1A 0A
 * (PNG spec, ISO/IEC 15948, §5.2), JPEG SOI FF D8 (ITU-T T.81, Table B.1). file-type reads past them before it names
 * a type, so a file cut short just after its signature is recognised here, to be called damaged rather than unknown.
 */
const SIGNATURES: [AttachmentType, Buffer][] = [
  ["application/pdf", Buffer.from("%PDF-", "latin1")],
  ["image/png", Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])],
  ["image/jpeg", Buffer.from([0xff, 0xd8])],
];

function startsLike(b: Buffer): AttachmentType | undefined {
  return SIGNATURES.find(([, sig]) => {
    const n = Math.min(b.length, sig.length);
    return n >= Math.min(sig.length, 4) && b.subarray(0, n).equals(sig.subarray(0, n));
  })?.[0];
}

/** One file: the checked attachment, or a message naming the file and what is wrong with it. */
async function checkOne(file: File): Promise<CheckedAttachment | string> {
  const shown = `"${safeFileName(file.name) || "unnamed file"}"`;
  if (file.size === 0) return `${shown} is empty (0 bytes); choose the saved report itself.`;
  if (file.size > MAX_ATTACHMENT_BYTES) {
    return `${shown} is larger than the ${formatBytes(MAX_ATTACHMENT_BYTES)} limit per file (${file.size.toLocaleString("en-US")} bytes); save it smaller or split it.`;
  }
  const content = Buffer.from(await file.arrayBuffer());
  const detected = await fileTypeFromBuffer(content);
  const truncated = detected ? undefined : startsLike(content);
  if (truncated) return `${shown} starts like a ${ATTACHMENT_TYPE_WORDS[truncated]} but is cut short or damaged; upload the complete file.`;
  if (!detected || !isAccepted(detected.mime)) {
    const what = detected
      ? `${OTHER_TYPE_WORDS[detected.ext] ?? `a .${detected.ext} file`} (${detected.mime})`
      : looksLikeText(content)
        ? "plain text"
        : "of a type Corvane does not recognise";
    return `${shown} is ${what} by its content, not a PDF, PNG or JPEG; attach service reports as PDF, PNG or JPEG.`;
  }
  if (!COMPLETE[detected.mime](content)) {
    return `${shown} starts like a ${ATTACHMENT_TYPE_WORDS[detected.mime]} but is cut short or damaged; upload the complete file.`;
  }
  return {
    fileName: safeFileName(file.name, detected.mime),
    contentType: detected.mime,
    sizeBytes: content.length,
    sha256: createHash("sha256").update(content).digest("hex"),
    content,
  };
}

/** All files of one entry: every problem is reported (each naming its file), and one bad file refuses them all. */
export async function checkAttachments(files: readonly File[]): Promise<AttachmentsCheck> {
  const results = await Promise.all(files.map(checkOne));
  const messages = results.filter((r): r is string => typeof r === "string");
  if (messages.length) return { ok: false, messages };
  const total = files.reduce((n, f) => n + f.size, 0);
  if (total > MAX_ENTRY_UPLOAD_BYTES) {
    return { ok: false, messages: [`These ${files.length} files come to ${formatBytes(total)}; one entry takes at most ${formatBytes(MAX_ENTRY_UPLOAD_BYTES)} of files in all.`] };
  }
  return { ok: true, attachments: results as CheckedAttachment[] };
}
