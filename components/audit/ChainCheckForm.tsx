// The chain check on the Audit trail page. A server component, so the page renders it without props: it lists the
// units whose clocks a date-time range may be read on (those the person may audit) for the client form.
import { currentActor } from "@/lib/auth/guard";
import { unitsWhere } from "@/lib/auth/roles";
import { listUnits } from "@/lib/units/repository";
import { ChainCheckFields } from "./ChainCheckFields";

export async function ChainCheckForm() {
  const actor = await currentActor();
  const allowed = new Set(actor ? unitsWhere(actor.grants, "audit.view") : []);
  const units = (await listUnits()).filter((u) => allowed.has(u.id)).map((u) => ({ id: u.id, name: u.name, timeZone: u.timeZone }));
  return <ChainCheckFields units={units} />;
}
