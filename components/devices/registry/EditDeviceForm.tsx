"use client";
// The device record's edit form (all fields but the serial, plus in service / in maintenance). It sends the version
// it was rendered with, so an edit made over someone else's newer change is refused rather than silently undoing it.
import { useId } from "react";
import { updateDevice } from "@/lib/devices/actions";
import { EDITABLE_STATUSES, EDITABLE_STATUS_LABELS } from "@/lib/devices/registry.validation";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { DeviceFieldInputs, type DeviceFieldValues } from "./DeviceFieldInputs";

export function EditDeviceForm({ unitId, deviceId, version, status, values }: {
  unitId: string;
  deviceId: string;
  version: number;
  status: (typeof EDITABLE_STATUSES)[number];
  values: DeviceFieldValues;
}) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(updateDevice);
  const id = useId();
  return (
    <form onSubmit={onSubmit} onChange={onChange} aria-label="Edit the device record" className="space-y-4" noValidate>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="deviceId" value={deviceId} />
      {/* A controlled value: it follows the page after each save, so the next edit names the version now saved. */}
      <input type="hidden" name="version" value={version} />
      <div aria-live="polite">{state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}</div>
      <fieldset>
        <legend className="mb-1 font-bold">Status</legend>
        <div className="flex flex-wrap gap-x-6 gap-y-1">
          {EDITABLE_STATUSES.map((s) => (
            <label key={s} className="flex items-center gap-2">
              <input type="radio" name="status" value={s} defaultChecked={s === status} aria-describedby={`${id}-status-error`} />
              {EDITABLE_STATUS_LABELS[s]}
            </label>
          ))}
        </div>
        <FieldError id={`${id}-status-error`} errors={errorsFor("status")} />
      </fieldset>
      <DeviceFieldInputs idPrefix={`${id}-edit`} errorsFor={errorsFor} defaults={values} />
      <FieldError id={`${id}-version-error`} errors={errorsFor("version") ?? errorsFor("deviceId")} />
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Saving…" : "Save changes"}</button>
    </form>
  );
}
