// One device's last 24 h of stream health, minute by minute, as JSON (the device's Stream health tab refreshes from
// here). The device must belong to the unit in the address; stream data only, so reads are not audited.
import { deviceHealthSeries } from "@/lib/devices/health";
import { guardDeviceApi } from "@/lib/devices/device-scope";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(_req: Request, { params }: { params: Promise<{ unitId: string; deviceId: string }> }) {
  const guard = await guardDeviceApi("devices.view", await params);
  if (!guard.ok) return guard.response;
  const series = await deviceHealthSeries(guard.device.id);
  if (!series) return json(404, { error: "not_found", message: "No such device in this unit." });
  return json(200, series);
}
