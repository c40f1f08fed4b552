import Link from "next/link";
import { guardPage } from "@/lib/auth/guard";
import { landingPath } from "@/lib/auth/navigation";

export const metadata = { title: "Not available to your roles" };

export default async function Forbidden() {
  const actor = await guardPage();
  const home = landingPath(actor.grants);
  return (
    <section className="card mx-auto max-w-xl p-8">
      <h1>Not available to your roles</h1>
      <p className="mt-3 text-muted">
        That screen or unit is outside the roles you hold. If you need it for your work, ask your unit administrator to
        grant the role. The refused attempt has been recorded in the audit trail.
      </p>
      {home ? (
        <p className="mt-6">
          <Link href={home} className="btn-primary">Go to your first screen</Link>
        </p>
      ) : (
        <p className="mt-6">You hold no roles in any unit yet.</p>
      )}
    </section>
  );
}
