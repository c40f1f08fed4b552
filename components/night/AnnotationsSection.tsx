"use client";
// The night's clinical event annotations: the list (the text alternative of the chart markers), an edit form per
// annotation and a form to add one, for people who may annotate in the unit.
import { useCallback, useState } from "react";
import type { AnnotationDTO } from "@/lib/review/annotations";
import { ANNOTATION_KIND_LABELS } from "@/lib/review/annotations.validation";
import { Notice } from "@/components/Notice";
import { AnnotationForm } from "./AnnotationForm";
import { dayClock } from "./format";

export function AnnotationsSection({ stayId, timeZone, annotations, canAnnotate, minAt, maxAt, onChanged, onShow }: {
  stayId: string;
  timeZone: string;
  annotations: AnnotationDTO[];
  canAnnotate: boolean;
  minAt: string;
  maxAt: string;
  /** Called after a save, to reload the night. */
  onChanged: () => void;
  onShow: (centreS: number) => void;
}) {
  const [editingId, setEditingId] = useState<string | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  // A new key after each addition gives an empty form for the next one.
  const [formKey, setFormKey] = useState(0);
  const editing = annotations.find((a) => a.id === editingId);

  const saved = useCallback(
    (text: string) => {
      setMessage(text);
      setEditingId(null);
      setFormKey((k) => k + 1);
      onChanged();
    },
    [onChanged],
  );

  return (
    <section aria-labelledby="annotations-heading" className="card space-y-4 p-4">
      <h2 id="annotations-heading">Clinical events this night</h2>
      {message && <Notice tone="fine">{message}</Notice>}
      {annotations.length === 0 ? (
        <p className="text-muted">No events annotated for this night.</p>
      ) : (
        <ul className="divide-y divide-line" aria-label="Annotations, oldest first">
          {annotations.map((a) => (
            <li key={a.id} className="py-3">
              <p>
                <time dateTime={a.occurredAt} className="font-bold">{dayClock(a.occurredAt, timeZone)}</time>
                <span className="ml-2 rounded border border-line px-1.5 py-0.5 text-sm">{ANNOTATION_KIND_LABELS[a.kind]}</span>
              </p>
              <p className="mt-1 whitespace-pre-wrap">{a.note}</p>
              <p className="mt-1 text-sm text-muted">
                {a.author}, {dayClock(a.updatedAt, timeZone)}
                {a.version > 1 ? ` (edited, version ${a.version})` : ""}
              </p>
              <div className="mt-1 flex gap-4 text-sm">
                <button type="button" className="text-accent underline-offset-2 hover:underline" onClick={() => onShow(Date.parse(a.occurredAt) / 1000)}>
                  Zoom here<span className="sr-only"> ({ANNOTATION_KIND_LABELS[a.kind]} at {dayClock(a.occurredAt, timeZone)})</span>
                </button>
                {canAnnotate && editingId !== a.id && (
                  <button type="button" className="text-accent underline-offset-2 hover:underline" onClick={() => { setMessage(null); setEditingId(a.id); }}>
                    Edit<span className="sr-only"> the annotation at {dayClock(a.occurredAt, timeZone)}</span>
                  </button>
                )}
              </div>
              {editing && editing.id === a.id && (
                <div className="mt-3 rounded-md border border-line bg-raised p-4">
                  <AnnotationForm
                    key={`${editing.id}-${editing.version}`}
                    stayId={stayId}
                    timeZone={timeZone}
                    minAt={minAt}
                    maxAt={maxAt}
                    editing={editing}
                    onSaved={saved}
                    onCancel={() => setEditingId(null)}
                  />
                </div>
              )}
            </li>
          ))}
        </ul>
      )}
      {canAnnotate ? (
        <div className="border-t border-line pt-4">
          <AnnotationForm key={formKey} stayId={stayId} timeZone={timeZone} minAt={minAt} maxAt={maxAt} onSaved={saved} />
        </div>
      ) : (
        <p className="text-sm text-muted">Your roles in this unit do not include annotating.</p>
      )}
    </section>
  );
}
