"use client";
// Registration of a device in the unit. On success the device page opens, where its stream token is issued.
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect } from "react";
import { registerDevice } from "@/lib/devices/actions";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { DeviceFieldInputs } from "./DeviceFieldInputs";

export function RegisterDeviceForm({ unitId, simulatorPort }: { unitId: string; simulatorPort: number }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(registerDevice);
  const router = useRouter();
  const deviceId = state?.ok ? state.data?.deviceId : undefined;
  useEffect(() => {
    if (deviceId) router.push(`/units/${unitId}/devices/${deviceId}`);
  }, [deviceId, router, unitId]);
  return (
    <form onSubmit={onSubmit} onChange={onChange} aria-label="Register a device" className="card space-y-4 p-5" noValidate>
      <input type="hidden" name="unitId" value={unitId} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.ok ? `${state.message} Opening the device page…` : state.message}</Notice>}
      <DeviceFieldInputs idPrefix="register" errorsFor={errorsFor} withSerial simulatorPort={simulatorPort} />
      <div className="flex flex-wrap items-center gap-4">
        <button type="submit" className="btn-primary" disabled={pending || !!deviceId}>{pending ? "Registering…" : "Register device"}</button>
        <Link href={`/units/${unitId}/devices`}>Cancel</Link>
      </div>
    </form>
  );
}
