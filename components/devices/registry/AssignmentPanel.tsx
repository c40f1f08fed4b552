"use client";
// The device's bed: where it is now, and (for those who manage devices) assign it to a free bed of the unit from a
// time, or take it off its bed at a time. Times are the unit's wall clock; empty means now. The action hooks live
// here, in the panel that stays mounted, because the refresh after an answer swaps the assign and unassign forms.
import { useId } from "react";
import { assignDevice, unassignDevice } from "@/lib/devices/actions";
import type { AssignmentDTO, BedChoiceDTO } from "@/lib/devices/registry";
import { formatLocal } from "@/lib/time";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { ConfirmStep } from "./ConfirmStep";

type Form = ReturnType<typeof useActionForm<undefined>>;

function TimeField({ name, label, form }: { name: "from" | "at"; label: string; form: Form }) {
  const id = useId();
  const errors = form.errorsFor(name);
  const occurrence = form.errorsFor("occurrence");
  return (
    <div>
      <label htmlFor={id} className="mb-1 block font-bold">{label} <span className="font-normal text-muted">(optional)</span></label>
      <p id={`${id}-hint`} className="mb-1 text-sm text-muted">Leave empty for now, or enter a time within the last 24 hours (unit time).</p>
      <input id={id} name={name} type="datetime-local" className="field-input max-w-xs"
        aria-invalid={errors ? true : undefined} aria-describedby={`${id}-hint ${id}-error`} />
      <FieldError id={`${id}-error`} errors={errors} />
      {occurrence && (
        <fieldset className="mt-2">
          <legend className="text-sm font-bold">Which of the two times?</legend>
          <div className="flex gap-4">
            <label className="flex items-center gap-2"><input type="radio" name="occurrence" value="earlier" /> The first</label>
            <label className="flex items-center gap-2"><input type="radio" name="occurrence" value="later" /> The second</label>
          </div>
          <FieldError id={`${id}-occurrence-error`} errors={occurrence} />
        </fieldset>
      )}
    </div>
  );
}

function Hidden({ unitId, deviceId }: { unitId: string; deviceId: string }) {
  return (
    <>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="deviceId" value={deviceId} />
    </>
  );
}

export function AssignmentPanel({ unitId, deviceId, serial, timeZone, current, beds, canManage, decommissioned, inMaintenance }: {
  unitId: string;
  deviceId: string;
  serial: string;
  timeZone: string;
  current: AssignmentDTO | null;
  beds: BedChoiceDTO[];
  canManage: boolean;
  decommissioned: boolean;
  inMaintenance: boolean;
}) {
  const assign = useActionForm(assignDevice);
  const unassign = useActionForm(unassignDevice);
  const bedId = useId();
  const freeBeds = beds.filter((b) => b.free);
  // On a bed, the assign form's success is the news; off a bed, the unassign form's.
  const answer = current ? (assign.state?.ok ? assign.state : null) : unassign.state?.ok ? unassign.state : null;
  return (
    <section aria-labelledby="bed-heading" className="card space-y-4 p-5">
      <h2 id="bed-heading">Bed</h2>
      {current ? (
        <p>
          On bed <span className="font-mono font-bold">{current.bedLabel}</span> since{" "}
          <time dateTime={current.from}>{formatLocal(current.from, timeZone)}</time>
          {current.assignedBy && <span className="text-muted"> · assigned by {current.assignedBy}</span>}
        </p>
      ) : (
        <p>
          <span aria-hidden="true">— </span>Not on a bed. Corvane reads a device&apos;s stream only while it is on a bed.
        </p>
      )}
      {inMaintenance && current && <p className="text-muted">The device is in maintenance: Corvane does not read its stream until it is back in service.</p>}
      <div aria-live="polite">{answer && <Notice tone="fine">{answer.message}</Notice>}</div>

      {canManage && !decommissioned && current && (
        <form onSubmit={unassign.onSubmit} onChange={unassign.onChange} aria-label="Take the device off its bed" className="space-y-3 border-t border-line pt-4">
          <Hidden unitId={unitId} deviceId={deviceId} />
          {unassign.state && !unassign.state.ok && <Notice tone="problem">{unassign.state.message}</Notice>}
          <TimeField name="at" label="Off the bed from" form={unassign} />
          <ConfirmStep
            label="Unassign…"
            confirmLabel="Unassign now"
            pending={unassign.pending}
            resetKey={unassign.state}
            question={<p>Corvane stops reading the stream of <span className="font-mono">{serial}</span> for bed <span className="font-mono">{current.bedLabel}</span> from the time given.</p>}
          />
        </form>
      )}

      {canManage && !decommissioned && !current && (
        <form onSubmit={assign.onSubmit} onChange={assign.onChange} aria-label="Assign the device to a bed" className="space-y-3 border-t border-line pt-4" noValidate>
          <Hidden unitId={unitId} deviceId={deviceId} />
          {assign.state && !assign.state.ok && <Notice tone="problem">{assign.state.message}</Notice>}
          <div>
            <label htmlFor={bedId} className="mb-1 block font-bold">Bed</label>
            <select id={bedId} name="bedId" defaultValue="" required className="field-input max-w-xs"
              aria-invalid={assign.errorsFor("bedId") ? true : undefined} aria-describedby={`${bedId}-error`}>
              <option value="" disabled>{freeBeds.length ? "Choose a free bed" : "No free bed in this unit"}</option>
              {beds.map((b) => (
                <option key={b.id} value={b.id} disabled={!b.free}>{b.free ? b.label : `${b.label} — has a device`}</option>
              ))}
            </select>
            <FieldError id={`${bedId}-error`} errors={assign.errorsFor("bedId")} />
          </div>
          <TimeField name="from" label="On the bed from" form={assign} />
          <button type="submit" className="btn-primary" disabled={assign.pending || freeBeds.length === 0}>{assign.pending ? "Assigning…" : "Assign to bed"}</button>
        </form>
      )}
      {decommissioned && <p className="text-muted">This device is decommissioned: it cannot be put on a bed.</p>}
    </section>
  );
}
