"use client";
// The dry run, one row per data row of the file: line, serial, outcome and each column's errors. Paged (a file may
// hold up to 1,000 rows) and, when some rows have errors, filterable to those rows.
import { useState } from "react";
import type { ImportRowDTO } from "@/lib/devices/import";
import { OutcomeTag } from "./OutcomeTag";

const PAGE_ROWS = 100;

export function DryRunTable({ rows, caption }: { rows: ImportRowDTO[]; caption: string }) {
  const [onlyErrors, setOnlyErrors] = useState(false);
  const [page, setPage] = useState(0);
  const withErrors = rows.filter((r) => r.outcome === "error").length;
  const shown = onlyErrors ? rows.filter((r) => r.outcome === "error") : rows;
  const pages = Math.max(1, Math.ceil(shown.length / PAGE_ROWS));
  const current = Math.min(page, pages - 1);
  const slice = shown.slice(current * PAGE_ROWS, (current + 1) * PAGE_ROWS);
  return (
    <div className="space-y-3">
      {withErrors > 0 && withErrors < rows.length && (
        <label className="inline-flex items-center gap-2">
          <input
            type="checkbox"
            checked={onlyErrors}
            onChange={(e) => {
              setOnlyErrors(e.target.checked);
              setPage(0);
            }}
          />
          Show only the {withErrors} row{withErrors === 1 ? "" : "s"} with errors
        </label>
      )}
      <div className="card overflow-x-auto">
        <table>
          <caption className="sr-only">{caption}</caption>
          <thead>
            <tr>
              <th scope="col" className="w-20">Line</th>
              <th scope="col">Serial</th>
              <th scope="col">Outcome</th>
            </tr>
          </thead>
          <tbody>
            {slice.map((r) => (
              <tr key={r.line}>
                <td className="font-mono">{r.line}</td>
                <td className="font-mono break-all">{r.serial || <span className="text-muted">(empty)</span>}</td>
                <td>
                  <OutcomeTag outcome={r.outcome} />
                  {r.errors.length > 0 && (
                    <ul className="mt-1 space-y-0.5 text-sm">
                      {r.errors.map((e) => (
                        <li key={e.column}>
                          <span className="font-mono text-muted">{e.column}</span>: {e.messages.join(" ")}
                        </li>
                      ))}
                    </ul>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pages > 1 && (
        <nav aria-label="Pages of the dry run" className="flex flex-wrap items-center gap-3">
          <button type="button" className="btn-secondary" disabled={current === 0} onClick={() => setPage(current - 1)}>
            Previous {PAGE_ROWS}
          </button>
          <span aria-live="polite">
            Rows {current * PAGE_ROWS + 1}–{current * PAGE_ROWS + slice.length} of {shown.length}
          </span>
          <button type="button" className="btn-secondary" disabled={current >= pages - 1} onClick={() => setPage(current + 1)}>
            Next {PAGE_ROWS}
          </button>
        </nav>
      )}
    </div>
  );
}
