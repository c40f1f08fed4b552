"use client";
// Runs a server action from a form's submit event instead of <form action>. React resets a form after an action
// passed as its `action` prop completes, which would wipe what the person typed whenever the server answers with
// field errors; submitting through a transition keeps every value in place.
import { startTransition, useActionState, useState, type FormEvent } from "react";
import type { ActionResult } from "@/lib/auth/action-result";

export function useActionForm<R>(action: (prev: ActionResult<R> | null, form: FormData) => Promise<ActionResult<R>>) {
  const [state, dispatch, pending] = useActionState<ActionResult<R> | null, FormData>(action, null);
  // Fields edited since the last answer: their old error messages no longer apply.
  const [edited, setEdited] = useState<{ for: unknown; names: Set<string> }>({ for: null, names: new Set() });
  const onSubmit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    startTransition(() => dispatch(form));
  };
  const onChange = (e: FormEvent<HTMLFormElement>) => {
    const name = (e.target as HTMLInputElement).name;
    if (!name) return;
    setEdited((prev) => ({ for: state, names: new Set(prev.for === state ? [...prev.names, name] : [name]) }));
  };
  const fieldErrors = (state && !state.ok ? state.fieldErrors ?? {} : {}) as Record<string, string[] | undefined>;
  const errorsFor = (name: string) => (edited.for === state && edited.names.has(name) ? undefined : fieldErrors[name]);
  return { state, pending, onSubmit, onChange, errorsFor };
}
