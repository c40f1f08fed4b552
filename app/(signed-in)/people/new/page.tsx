import { guardPage } from "@/lib/auth/guard";
import { unitsWhere } from "@/lib/auth/roles";
import { listUnits } from "@/lib/units/repository";
import { CreatePersonForm } from "@/components/people/CreatePersonForm";

export const metadata = { title: "Add a person" };

export default async function NewPersonPage() {
  const actor = await guardPage("people.manage");
  const managed = unitsWhere(actor.grants, "people.manage");
  const units = (await listUnits()).filter((u) => managed.includes(u.id)).map((u) => ({ id: u.id, name: u.name, editable: true }));
  return (
    <div className="max-w-4xl space-y-5">
      <div>
        <h1>Add a person</h1>
        <p className="text-muted">Give roles only in the units where the person works. You can change them later.</p>
      </div>
      <div className="card p-6">
        <CreatePersonForm units={units} />
      </div>
    </div>
  );
}
