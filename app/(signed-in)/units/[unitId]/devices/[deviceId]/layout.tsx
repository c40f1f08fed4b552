import Link from "next/link";
import { guardDevicePage } from "@/lib/devices/device-scope";
import { DeviceTabs } from "@/components/devices/DeviceTabs";
import { PageHeader } from "@/components/shell/PageHeader";

const STATUS_LABEL = { active: "In service", maintenance: "In maintenance", decommissioned: "Decommissioned" } as const;

export default async function DeviceLayout({ children, params }: { children: React.ReactNode; params: Promise<{ unitId: string; deviceId: string }> }) {
  const { device } = await guardDevicePage("devices.view", await params);
  const base = `/units/${device.unitId}/devices/${device.id}`;
  return (
    <div className="space-y-5">
      <PageHeader
        eyebrow={<><Link href={`/units/${device.unitId}/devices`}>Device registry</Link> · {device.unitName}</>}
        title={device.serial}
        titleClassName="font-mono"
        description={
          <p className="text-muted">
            {device.manufacturer ? `${device.manufacturer} · ` : ""}
            {device.model} · <span className="font-bold text-ink">{STATUS_LABEL[device.status]}</span> ·{" "}
            {device.bedLabel ? <>bed <span className="font-bold text-ink">{device.bedLabel}</span></> : "not assigned to a bed"}
          </p>
        }
      />
      <DeviceTabs base={base} />
      {children}
    </div>
  );
}
