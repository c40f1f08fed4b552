import Link from "next/link";
import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { getUnit } from "@/lib/units/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DeviceImport } from "@/components/devices/import/DeviceImport";
import { ImportFileFormat } from "@/components/devices/import/ImportFileFormat";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Import devices" };

export default async function ImportDevicesPage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // The registry layout admits devices.view; importing needs devices.manage in this unit.
  await guardPage("devices.manage", unitId.data);
  const unit = await getUnit(unitId.data);
  if (!unit) notFound();
  return (
    <div className="space-y-5">
      <PageHeader
        eyebrow={<Link href={`/units/${unit.id}/devices`}>Device registry</Link>}
        title={<>Import devices from CSV <span className="font-normal text-muted">· {unit.name}</span></>}
      />
      <ImportFileFormat />
      <DeviceImport unitId={unit.id} />
    </div>
  );
}
