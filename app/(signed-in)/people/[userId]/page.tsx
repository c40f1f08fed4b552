import Link from "next/link";
import { notFound } from "next/navigation";
import { z } from "zod";
import { guardPage } from "@/lib/auth/guard";
import { unitsWhere } from "@/lib/auth/roles";
import { getPerson } from "@/lib/people/repository";
import { listUnits } from "@/lib/units/repository";
import { formatLocal } from "@/lib/time";
import { EditRolesForm } from "@/components/people/EditRolesForm";
import { SetActiveForm } from "@/components/people/SetActiveForm";
import { Notice } from "@/components/Notice";

export const metadata = { title: "Person" };

export default async function PersonPage({ params, searchParams }: {
  params: Promise<{ userId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const actor = await guardPage("people.manage");
  const userId = z.uuid().safeParse((await params).userId);
  if (!userId.success) notFound();
  const person = await getPerson(userId.data);
  if (!person) notFound();
  const created = (await searchParams).created === "1";
  const managed = unitsWhere(actor.grants, "people.manage");
  const allUnits = await listUnits();
  const units = allUnits
    .filter((u) => managed.includes(u.id) || person.grants.some((g) => g.unitId === u.id))
    .map((u) => ({ id: u.id, name: u.name, editable: managed.includes(u.id) }));
  const zone = allUnits[0]?.timeZone ?? "UTC";
  return (
    <div className="max-w-4xl space-y-5">
      <p><Link href="/people">← All people</Link></p>
      {created && <Notice tone="fine">{person.name} was added and can now sign in.</Notice>}
      <div>
        <h1>{person.name}</h1>
        <p className="text-muted">
          <span className="font-mono">{person.email}</span> · {person.active ? "Active" : "Deactivated"} · last sign-in{" "}
          {person.lastSignInAt ? formatLocal(person.lastSignInAt, zone) : "never"}
        </p>
      </div>
      <section className="card p-6" aria-labelledby="roles-heading">
        <h2 id="roles-heading" className="mb-4">Roles</h2>
        <EditRolesForm userId={person.id} units={units} grants={person.grants} />
      </section>
      <section className="card p-6" aria-labelledby="status-heading">
        <h2 id="status-heading">{person.active ? "Deactivate" : "Reactivate"}</h2>
        <p className="mb-4 mt-1 text-muted">
          {person.active
            ? "A deactivated person cannot sign in and is signed out at their next request. Their audit history stays."
            : "The person can sign in again with their existing password and roles."}
        </p>
        <SetActiveForm userId={person.id} active={person.active} name={person.name} />
      </section>
    </div>
  );
}
