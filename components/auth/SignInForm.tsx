"use client";
import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { signInSchema } from "@/lib/auth/sign-in.validation";

const messages = (windowMinutes: number): Record<string, string> => ({
  invalid: "That e-mail and password do not match an account. Check both and try again.",
  rate_limited: `Too many failed sign-ins. Sign-in is paused for this account or workstation for up to ${windowMinutes} minutes; your unit administrator can help sooner.`,
  inactive: "This account is deactivated. Ask your unit administrator.",
});

export function SignInForm({ callbackUrl, notice, windowMinutes }: { callbackUrl: string; notice?: string; windowMinutes: number }) {
  const router = useRouter();
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});

  async function onSubmit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = new FormData(e.currentTarget);
    const parsed = signInSchema.safeParse({ email: form.get("email"), password: form.get("password") });
    if (!parsed.success) {
      const errs: Record<string, string[]> = {};
      for (const i of parsed.error.issues) (errs[String(i.path[0])] ??= []).push(i.message);
      setFieldErrors(errs);
      setError(null);
      return;
    }
    setFieldErrors({});
    setPending(true);
    const res = await signIn("credentials", { ...parsed.data, redirect: false, callbackUrl });
    if (res?.ok && !res.error) {
      router.replace(callbackUrl);
      router.refresh();
      return;
    }
    setPending(false);
    setError(messages(windowMinutes)[res?.error ?? ""] ?? "Sign-in did not work. Try again in a moment.");
  }

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-describedby={error ? "signin-error" : undefined}>
      {notice && !error && <Notice tone="info">{notice}</Notice>}
      {error && (
        <Notice tone="problem" id="signin-error">
          {error}
        </Notice>
      )}
      <div>
        <label htmlFor="email" className="mb-1 block font-bold">E-mail</label>
        <input id="email" name="email" type="email" autoComplete="username" required className="field-input"
          aria-invalid={fieldErrors.email ? true : undefined} aria-describedby="email-error" />
        <FieldError id="email-error" errors={fieldErrors.email} />
      </div>
      <div>
        <label htmlFor="password" className="mb-1 block font-bold">Password</label>
        <input id="password" name="password" type="password" autoComplete="current-password" required className="field-input"
          aria-invalid={fieldErrors.password ? true : undefined} aria-describedby="password-error" />
        <FieldError id="password-error" errors={fieldErrors.password} />
      </div>
      <button type="submit" className="btn-primary w-full justify-center" disabled={pending}>
        {pending ? "Signing in…" : "Sign in"}
      </button>
    </form>
  );
}
