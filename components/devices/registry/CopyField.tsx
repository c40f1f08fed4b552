"use client";
// A read-only value in monospace with a Copy button; the field is selected on focus so it can also be copied by hand.
import { useId, useState } from "react";

export function CopyField({ label, value, multiline }: { label: string; value: string; multiline?: boolean }) {
  const id = useId();
  const [note, setNote] = useState("");
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(value);
      setNote("Copied.");
    } catch {
      // No clipboard access (an insecure origin, a refused permission): select it for a manual copy.
      (document.getElementById(id) as HTMLInputElement | HTMLTextAreaElement | null)?.select();
      setNote("Could not copy automatically: the text is selected, press Ctrl+C (⌘C on a Mac).");
    }
  };
  const common = {
    id,
    readOnly: true,
    value,
    spellCheck: false,
    onFocus: (e: React.FocusEvent<HTMLInputElement | HTMLTextAreaElement>) => e.currentTarget.select(),
    className: "field-input min-w-0 flex-1 font-mono text-sm",
  };
  return (
    <div>
      <label htmlFor={id} className="mb-1 block font-bold">{label}</label>
      <div className="flex flex-wrap items-start gap-2">
        {multiline ? <textarea {...common} rows={3} /> : <input {...common} />}
        <button type="button" className="btn-secondary" onClick={copy}>Copy<span className="sr-only"> {label.toLowerCase()}</span></button>
      </div>
      <p aria-live="polite" className="mt-1 text-sm text-muted">{note}</p>
    </div>
  );
}
