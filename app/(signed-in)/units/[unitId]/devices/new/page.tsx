// Registration of a device in the unit (biomedical engineers with "devices.manage" there).
import Link from "next/link";
import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { db } from "@/lib/db";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { demoSimulatorPort } from "@/lib/devices/simulator-command";
import { RegisterDeviceForm } from "@/components/devices/registry/RegisterDeviceForm";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Register a device" };

export default async function RegisterDevicePage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  await guardPage("devices.manage", unitId.data);
  const unit = await db("units").where({ id: unitId.data }).first("id", "name");
  if (!unit) notFound();
  // The suggested stream address for a device the one-device simulator stands in for: the first port after the demo
  // simulator's that no registered device's address uses yet (the demo simulator itself serves only the devices it
  // loaded when npm start began).
  const used = new Set(
    (await db("devices").pluck("stream_url")).map((u: string) => {
      try {
        return Number(new URL(u).port);
      } catch {
        return null;
      }
    }),
  );
  let port = demoSimulatorPort() + 1;
  while (used.has(port)) port += 1;
  return (
    <div className="max-w-4xl space-y-5">
      <PageHeader
        eyebrow={<><Link href={`/units/${unit.id}/devices`}>Device registry</Link> · {unit.name}</>}
        title="Register a device"
        description={
          <p className="mt-1 text-muted">
            The device joins this unit&apos;s registry without a token. On its page you then issue its stream token and assign it to a bed.
          </p>
        }
      />
      <RegisterDeviceForm unitId={unit.id} simulatorPort={port} />
    </div>
  );
}
