"use client";
// Record a maintenance entry for one device, with service reports attached. The server checks everything again (the
// files' types by their content); the count and sizes are also checked here before sending, because a request body
// over the server's limit would be refused before any check of ours could explain why.
import { useEffect, useRef, useState, type FormEvent } from "react";
import { addMaintenanceEntry } from "@/lib/devices/maintenance-actions";
import { MAINTENANCE_KIND_LABELS, MAX_ATTACHMENTS } from "@/lib/devices/maintenance.validation";
import { MAINTENANCE_KINDS, type MaintenanceKind } from "@/lib/db/tables";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

const mb = (n: number) => `${Math.round(n / (1024 * 1024))} MB`;

/** The problems the browser can see without reading the files; each names its file. */
function precheck(files: File[], maxFileBytes: number, maxEntryBytes: number): string[] {
  if (files.length > MAX_ATTACHMENTS) return [`Attach at most ${MAX_ATTACHMENTS} files to one entry; ${files.length} were chosen.`];
  const problems = files.flatMap((f) =>
    f.size === 0 ? [`"${f.name}" is empty (0 bytes).`] : f.size > maxFileBytes ? [`"${f.name}" is larger than the ${mb(maxFileBytes)} limit per file.`] : [],
  );
  const total = files.reduce((n, f) => n + f.size, 0);
  if (!problems.length && total > maxEntryBytes) problems.push(`These files come to more than ${mb(maxEntryBytes)} in all; attach fewer or smaller files.`);
  return problems;
}

export function MaintenanceEntryForm({ unitId, deviceId, today, firmware, nextDueHint, maxFileBytes, maxEntryBytes }: {
  unitId: string;
  deviceId: string;
  /** Today in the unit's time zone, "YYYY-MM-DD": the latest day work can be dated. */
  today: string;
  /** The device's firmware version now. */
  firmware: string;
  /** The current next due date in words, or null. */
  nextDueHint: string | null;
  maxFileBytes: number;
  maxEntryBytes: number;
}) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(addMaintenanceEntry);
  const [kind, setKind] = useState<MaintenanceKind>("preventive");
  const [fileProblems, setFileProblems] = useState<string[] | null>(null);
  const formRef = useRef<HTMLFormElement>(null);

  useEffect(() => {
    if (state?.ok) {
      formRef.current?.reset();
      setKind("preventive");
    }
  }, [state]);

  const submit = (e: FormEvent<HTMLFormElement>) => {
    const input = e.currentTarget.elements.namedItem("files") as HTMLInputElement;
    const problems = precheck(Array.from(input.files ?? []), maxFileBytes, maxEntryBytes);
    if (problems.length) {
      e.preventDefault();
      setFileProblems(problems);
      input.focus();
      return;
    }
    setFileProblems(null);
    onSubmit(e);
  };
  const change = (e: FormEvent<HTMLFormElement>) => {
    if ((e.target as HTMLInputElement).name === "files") setFileProblems(null);
    onChange(e);
  };

  const field = (name: string, hint = true) => {
    const errors = errorsFor(name);
    const describedBy = `${hint ? `mnt-${name}-hint ` : ""}mnt-${name}-error`;
    return { id: `mnt-${name}`, name, "aria-invalid": errors?.length ? true : undefined, "aria-describedby": describedBy } as const;
  };
  const fileErrors = fileProblems ?? errorsFor("files");

  return (
    <form ref={formRef} onSubmit={submit} onChange={change} className="space-y-4" noValidate>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="deviceId" value={deviceId} />
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      {state?.ok && <Notice tone="fine">{state.message}</Notice>}
      <div className="grid max-w-3xl gap-4 sm:grid-cols-2">
        <div>
          <label htmlFor="mnt-kind" className="mb-1 block text-sm font-bold">Kind of work</label>
          <select {...field("kind", false)} value={kind} onChange={(e) => setKind(e.target.value as MaintenanceKind)} className="field-input">
            {MAINTENANCE_KINDS.map((k) => <option key={k} value={k}>{MAINTENANCE_KIND_LABELS[k]}</option>)}
          </select>
          <FieldError id="mnt-kind-error" errors={errorsFor("kind")} />
        </div>
        <div>
          <label htmlFor="mnt-performedOn" className="mb-1 block text-sm font-bold">Date of the work</label>
          <input {...field("performedOn")} type="date" max={today} defaultValue={today} className="field-input" />
          <p id="mnt-performedOn-hint" className="mt-1 text-sm text-muted">Today or earlier.</p>
          <FieldError id="mnt-performedOn-error" errors={errorsFor("performedOn")} />
        </div>
        <div>
          <label htmlFor="mnt-performedBy" className="mb-1 block text-sm font-bold">Work done by</label>
          <input {...field("performedBy")} autoComplete="off" className="field-input" />
          <p id="mnt-performedBy-hint" className="mt-1 text-sm text-muted">A name, and the company for outside service.</p>
          <FieldError id="mnt-performedBy-error" errors={errorsFor("performedBy")} />
        </div>
        {kind === "firmware_update" && (
          <div>
            <label htmlFor="mnt-firmwareAfter" className="mb-1 block text-sm font-bold">Firmware version after the update</label>
            <input {...field("firmwareAfter")} autoComplete="off" className="field-input font-mono" />
            <p id="mnt-firmwareAfter-hint" className="mt-1 text-sm text-muted">
              Now <span className="font-mono">{firmware}</span>; the device record takes the new version.
            </p>
            <FieldError id="mnt-firmwareAfter-error" errors={errorsFor("firmwareAfter")} />
          </div>
        )}
        <div>
          <label htmlFor="mnt-nextDueOn" className="mb-1 block text-sm font-bold">Next maintenance due (optional)</label>
          <input {...field("nextDueOn")} type="date" className="field-input" />
          <p id="mnt-nextDueOn-hint" className="mt-1 text-sm text-muted">
            {nextDueHint ? `Leave empty to keep the current date (${nextDueHint}).` : "After the date of the work."}
          </p>
          <FieldError id="mnt-nextDueOn-error" errors={errorsFor("nextDueOn")} />
        </div>
      </div>
      <div className="max-w-3xl">
        <label htmlFor="mnt-note" className="mb-1 block text-sm font-bold">Note</label>
        <textarea {...field("note")} rows={3} className="field-input" />
        <p id="mnt-note-hint" className="mt-1 text-sm text-muted">What was checked, replaced or found. No patient details.</p>
        <FieldError id="mnt-note-error" errors={errorsFor("note")} />
      </div>
      <div className="max-w-3xl">
        <label htmlFor="mnt-files" className="mb-1 block text-sm font-bold">Service reports (optional)</label>
        <input
          id="mnt-files"
          name="files"
          type="file"
          multiple
          accept=".pdf,.png,.jpg,.jpeg"
          aria-invalid={fileErrors?.length ? true : undefined}
          aria-describedby="mnt-files-hint mnt-files-error"
          className="field-input file:mr-3 file:rounded file:border-0 file:bg-panel file:px-3 file:py-1 file:font-bold file:text-ink"
        />
        <p id="mnt-files-hint" className="mt-1 text-sm text-muted">
          PDF, PNG or JPEG; up to {MAX_ATTACHMENTS} files,{" "}
          {maxEntryBytes <= maxFileBytes ? `${mb(maxEntryBytes)} in all` : `${mb(maxFileBytes)} each and ${mb(maxEntryBytes)} in all`}. The
          type is checked from each file&apos;s content, not its name.
        </p>
        <FieldError id="mnt-files-error" errors={fileErrors} />
      </div>
      <button type="submit" className="btn-primary" disabled={pending}>
        {pending ? "Saving…" : "Save entry"}
      </button>
    </form>
  );
}
