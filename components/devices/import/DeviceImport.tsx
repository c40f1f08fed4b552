"use client";
// Upload → dry run → confirm. The upload stores a checked batch and writes no device; the table shows every row's
// outcome by line; "Confirm import" is offered only when every row will be added, and writes the batch the person
// saw, all rows or none. A confirmation that fails (a serial registered since the preview) shows its reasons in the
// table's rows.
import Link from "next/link";
import { useState, type FormEvent } from "react";
import { IMPORT_COLUMNS, type ImportColumn } from "@/lib/devices/import.validation";
import type { ImportPreviewDTO, ImportRowDTO } from "@/lib/devices/import";
import { confirmDeviceImport, previewDeviceImport } from "@/lib/devices/import-actions";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { DryRunTable } from "./DryRunTable";

const plural = (n: number, one: string, many: string) => `${n.toLocaleString("en")} ${n === 1 ? one : many}`;

/** The rows with the reasons a confirmation failed (field errors named "line.<n>.<column>") put in their rows. */
function withConfirmErrors(rows: ImportRowDTO[], fieldErrors: Record<string, string[] | undefined>): ImportRowDTO[] {
  const byLine = new Map<number, { column: ImportColumn; messages: string[] }[]>();
  for (const [key, messages] of Object.entries(fieldErrors)) {
    const m = /^line\.(\d+)\.(\w+)$/.exec(key);
    const column = IMPORT_COLUMNS.find((c) => c === m?.[2]);
    if (m && column && messages) byLine.set(Number(m[1]), [...(byLine.get(Number(m[1])) ?? []), { column, messages }]);
  }
  return rows.map((r) => (byLine.has(r.line) ? { ...r, outcome: "error", errors: byLine.get(r.line)! } : r));
}

export function DeviceImport({ unitId }: { unitId: string }) {
  const upload = useActionForm(previewDeviceImport);
  const confirm = useActionForm(confirmDeviceImport);
  // The batch the last confirmation was for: a new upload starts a new dry run with no confirmation shown.
  const [confirmedBatch, setConfirmedBatch] = useState<string | null>(null);
  const preview: ImportPreviewDTO | undefined = upload.state?.ok ? upload.state.data : undefined;
  const confirmState = preview && confirmedBatch === preview.batchId ? confirm.state : null;
  const fileErrors = upload.errorsFor("file");

  const onConfirm = (e: FormEvent<HTMLFormElement>) => {
    setConfirmedBatch(preview?.batchId ?? null);
    confirm.onSubmit(e);
  };

  const rows = preview && confirmState && !confirmState.ok ? withConfirmErrors(preview.rows, confirmState.fieldErrors ?? {}) : preview?.rows ?? [];
  const failedNow = rows.filter((r) => r.outcome === "error").length;

  return (
    <div className="space-y-5">
      <section aria-labelledby="upload" className="space-y-3">
        <h2 id="upload">Upload a file</h2>
        <form onSubmit={upload.onSubmit} onChange={upload.onChange} className="space-y-3" noValidate>
          <input type="hidden" name="unitId" value={unitId} />
          <div>
            <label htmlFor="file" className="mb-1 block font-bold">CSV file</label>
            <p id="file-hint" className="mb-1 text-sm text-muted">Checking the file writes no device: you see every row&apos;s outcome first.</p>
            <input
              id="file"
              name="file"
              type="file"
              accept=".csv,text/csv"
              required
              className="field-input max-w-xl"
              aria-invalid={fileErrors?.length ? true : undefined}
              aria-describedby="file-hint file-error"
            />
            <FieldError id="file-error" errors={fileErrors} />
          </div>
          {upload.state && !upload.state.ok && upload.state.code !== "invalid_input" && <Notice tone="problem">{upload.state.message}</Notice>}
          <button type="submit" className="btn-primary" disabled={upload.pending}>
            {upload.pending ? "Checking the file…" : "Check the file"}
          </button>
        </form>
      </section>

      {preview && (
        <section aria-labelledby="dry-run" className="space-y-3">
          <h2 id="dry-run">
            Dry run: <span className="font-mono font-normal">{preview.fileName}</span>
          </h2>
          <div aria-live="polite" className="space-y-3">
            {confirmState?.ok ? (
              <Notice tone="fine">
                <p>{confirmState.message}</p>
                <p className="mt-1">
                  <Link href={`/units/${unitId}/devices`}>Open the device registry</Link> to assign the new devices to beds and issue their stream tokens.
                </p>
              </Notice>
            ) : confirmState && !confirmState.ok ? (
              <Notice tone="problem">{confirmState.message}</Notice>
            ) : preview.withErrors > 0 ? (
              <Notice tone="problem">
                {plural(preview.total, "row", "rows")}: {preview.toAdd.toLocaleString("en")} will be added, {plural(preview.withErrors, "has errors", "have errors")} — fix the file and upload it again. Nothing was imported.
              </Notice>
            ) : (
              <Notice tone="info">
                {plural(preview.total, "row", "rows")}: {preview.total === 1 ? "it" : `all ${preview.total.toLocaleString("en")}`} will be added. Nothing is written until you confirm.
              </Notice>
            )}
          </div>
          {preview.withErrors === 0 && !confirmState && (
            <form onSubmit={onConfirm} noValidate>
              <input type="hidden" name="unitId" value={unitId} />
              <input type="hidden" name="batchId" value={preview.batchId} />
              <button type="submit" className="btn-primary" disabled={confirm.pending}>
                {confirm.pending ? "Importing…" : `Confirm import of ${plural(preview.total, "device", "devices")}`}
              </button>
              <p className="mt-1 text-sm text-muted">All rows are imported together or none is; the preview can be confirmed within an hour.</p>
            </form>
          )}
          <DryRunTable
            key={`${preview.batchId}-${failedNow}`}
            rows={rows}
            caption={`Outcome of each row of ${preview.fileName}${confirmState && !confirmState.ok ? ", as checked at confirmation" : ""}`}
          />
        </section>
      )}
    </div>
  );
}
