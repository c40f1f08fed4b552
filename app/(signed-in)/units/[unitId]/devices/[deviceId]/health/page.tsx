// One device's stream health: its latest figures and the last 24 h minute by minute (beats received, stream events,
// clock offset with its drift). The device layout renders the h1 (serial) and the tabs. Stream data only, so the read
// is not audited.
import { notFound } from "next/navigation";
import { deviceHealthSeries } from "@/lib/devices/health";
import { guardDevicePage } from "@/lib/devices/device-scope";
import { DeviceHealthView } from "@/components/devices/health/DeviceHealthView";

export const metadata = { title: "Device stream health" };

export default async function DeviceHealthPage({ params }: { params: Promise<{ unitId: string; deviceId: string }> }) {
  const { device } = await guardDevicePage("devices.view", await params);
  const series = await deviceHealthSeries(device.id);
  if (!series) notFound();
  return <DeviceHealthView initial={series} unitId={device.unitId} />;
}
