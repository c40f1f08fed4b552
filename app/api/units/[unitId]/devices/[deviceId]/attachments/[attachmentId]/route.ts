// Download of one maintenance attachment (biomedical engineers of the device's unit). Always as a download, with the
// type detected at upload and no sniffing, so a stored file is never rendered as a page of Corvane. Each download is
// audited with the file's SHA-256.
import { z } from "zod";
import { auditAs } from "@/lib/auth/guard";
import { guardDeviceApi } from "@/lib/devices/device-scope";
import { attachmentForDownload } from "@/lib/devices/maintenance";

export const dynamic = "force-dynamic";

const attachmentIdSchema = z.uuid();
const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

/** RFC 8187 value characters (attr-char); everything else percent-encoded as UTF-8. */
const rfc8187 = (s: string) => encodeURIComponent(s).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`);
/** For clients that ignore filename* (RFC 6266 §4.3): printable ASCII without quote or backslash. */
const asciiFallback = (s: string) => s.replace(/[^\x20-\x7e]|["\\]/g, "_");

export async function GET(_req: Request, { params }: { params: Promise<{ unitId: string; deviceId: string; attachmentId: string }> }) {
  const p = await params;
  const guard = await guardDeviceApi("devices.view", p);
  if (!guard.ok) return guard.response;
  const attachmentId = attachmentIdSchema.safeParse(p.attachmentId);
  if (!attachmentId.success) return json(400, { error: "bad_request", message: "Not an attachment id." });
  const file = await attachmentForDownload(guard.device.unitId, guard.device.id, attachmentId.data);
  if (!file) return json(404, { error: "not_found", message: "No such attachment for this device." });
  await auditAs(guard.actor, {
    action: "device.attachment.download",
    permission: "devices.view",
    unitId: guard.device.unitId,
    target: { type: "device_attachment", id: file.id },
    detail: { deviceId: guard.device.id, maintenanceId: file.maintenanceId, contentType: file.contentType, sizeBytes: file.sizeBytes, sha256: file.sha256 },
  });
  return new Response(new Uint8Array(file.content), {
    status: 200,
    headers: {
      "Content-Type": file.contentType,
      // Next 16 drops Content-Length from route handler responses (FORBIDDEN_HEADERS in next/dist/server/send-response.js)
      // and sends the body chunked; it is set here for any runtime that keeps it.
      "Content-Length": String(file.content.length),
      "Content-Disposition": `attachment; filename="${asciiFallback(file.fileName)}"; filename*=UTF-8''${rfc8187(file.fileName)}`,
      "X-Content-Type-Options": "nosniff",
      "Cache-Control": "no-store",
      // Should a browser show it inline after all, it runs no script and loads nothing.
      "Content-Security-Policy": "default-src 'none'; sandbox",
    },
  });
}
