import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import { authOptions } from "@/lib/auth/options";
import { safeCallbackUrl } from "@/lib/auth/callback-url";
import { config } from "@/lib/config";
import { SignInForm } from "@/components/auth/SignInForm";
import { DEMO_HOSPITAL, DEMO_PASSWORD, DEMO_PEOPLE } from "@/seeds/demo-data";

export const metadata = { title: "Sign in" };

const REASONS: Record<string, string> = {
  idle: "You were signed out after a period without activity. Sign in to return to where you were.",
  signed_out: "You have signed out.",
};

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const sp = await searchParams;
  const callbackUrl = safeCallbackUrl(typeof sp.callbackUrl === "string" ? sp.callbackUrl : undefined);
  if (await getServerSession(authOptions())) redirect(callbackUrl);
  const reason = typeof sp.reason === "string" ? REASONS[sp.reason] : undefined;
  const demo = config().CORVANE_DEMO_MODE === "1";
  return (
    <main id="main" className="mx-auto flex min-h-screen max-w-5xl flex-col items-center justify-center gap-8 px-6 py-10 md:flex-row md:items-start md:pt-24">
      <section className="w-full max-w-md">
        <div className="mb-6 flex items-center gap-3">
          <svg aria-hidden="true" viewBox="0 0 32 32" className="h-10 w-10">
            <path d="M4 18h6l3-8 4 14 3-10 2 4h6" fill="none" stroke="currentColor" className="text-accent" strokeWidth="2.6" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
          <div>
            <h1 className="text-3xl">Corvane</h1>
            <p className="text-muted">Heart-rate variability trends for ward review</p>
          </div>
        </div>
        <div className="card p-6">
          <h2 className="mb-4">Sign in</h2>
          <SignInForm callbackUrl={callbackUrl} notice={reason} windowMinutes={config().CORVANE_SIGNIN_WINDOW_MINUTES} />
        </div>
        <p className="mt-4 text-sm text-muted">
          Decision support only: not for diagnosis. Bedside monitor alarms stay primary.
        </p>
      </section>
      {demo && (
        <section aria-labelledby="demo-heading" className="card w-full max-w-md p-6">
          <h2 id="demo-heading">Demo sign-ins</h2>
          <p className="mt-1 text-sm text-muted">
            Invented people in {DEMO_HOSPITAL}. Every demo account uses the password{" "}
            <code className="rounded bg-raised px-1.5 py-0.5 font-mono text-ink">{DEMO_PASSWORD}</code>.
          </p>
          <ul className="mt-4 space-y-2 text-sm">
            {DEMO_PEOPLE.map((p) => (
              <li key={p.email}>
                <code className="font-mono text-ink">{p.email}</code>
                <span className="block text-muted">{p.name} — {p.label}</span>
              </li>
            ))}
          </ul>
        </section>
      )}
    </main>
  );
}
