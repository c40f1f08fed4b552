"use client";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect } from "react";
import { createPerson } from "@/lib/people/actions";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { RolesGrid, type GridUnit } from "./RolesGrid";

export function CreatePersonForm({ units }: { units: GridUnit[] }) {
  const router = useRouter();
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(createPerson);
  useEffect(() => {
    if (state?.ok && state.data) router.push(`/people/${state.data.id}?created=1`);
  }, [state, router]);
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-5" noValidate>
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      <div className="grid gap-5 md:grid-cols-2">
        <div>
          <label htmlFor="name" className="mb-1 block font-bold">Full name</label>
          <input id="name" name="name" className="field-input" autoComplete="off" required aria-invalid={errorsFor("name") ? true : undefined} aria-describedby="name-error" />
          <FieldError id="name-error" errors={errorsFor("name")} />
        </div>
        <div>
          <label htmlFor="email" className="mb-1 block font-bold">Work e-mail</label>
          <input id="email" name="email" type="email" className="field-input" autoComplete="off" required aria-invalid={errorsFor("email") ? true : undefined} aria-describedby="email-error" />
          <FieldError id="email-error" errors={errorsFor("email")} />
        </div>
        <div>
          <label htmlFor="password" className="mb-1 block font-bold">Initial password</label>
          <input id="password" name="password" type="password" className="field-input" autoComplete="new-password" required aria-invalid={errorsFor("password") ? true : undefined} aria-describedby="password-hint password-error" />
          <p id="password-hint" className="mt-1 text-sm text-muted">At least 12 characters. Hand it over in person.</p>
          <FieldError id="password-error" errors={errorsFor("password")} />
        </div>
      </div>
      <RolesGrid units={units} grants={[]} errors={errorsFor("grants")} />
      <div className="flex gap-3">
        <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Adding…" : "Add person"}</button>
        <Link href="/people" className="btn-secondary">Cancel</Link>
      </div>
    </form>
  );
}
