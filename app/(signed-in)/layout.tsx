// Every signed-in screen: the guard (signed in, active), the top bar, navigation, and the idle lock.
import Link from "next/link";
import { guardPage } from "@/lib/auth/guard";
import { navItems } from "@/lib/auth/navigation";
import { ROLE_LABELS, unitsWhere } from "@/lib/auth/roles";
import { config } from "@/lib/config";
import { listUnits } from "@/lib/units/repository";
import { DEMO_HOSPITAL } from "@/seeds/demo-data";
import { IdleLock } from "@/components/shell/IdleLock";
import { NavLinks } from "@/components/shell/NavLinks";
import { SignOutButton } from "@/components/shell/SignOutButton";
import { UnitSwitcher, type SwitcherUnit } from "@/components/shell/UnitSwitcher";

export default async function SignedInLayout({ children }: { children: React.ReactNode }) {
  const actor = await guardPage();
  const units: SwitcherUnit[] = (await listUnits())
    .map((u) => ({
      id: u.id,
      name: u.name,
      roles: actor.grants.filter((g) => g.unitId === u.id).map((g) => ROLE_LABELS[g.role]),
    }))
    .filter((u) => u.roles.length);
  return (
    <>
      <header className="border-b border-line bg-panel">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-3 px-6 py-3">
          <Link href="/" className="flex items-center gap-2 text-xl font-bold text-ink hover:no-underline">
            <svg aria-hidden="true" viewBox="0 0 32 32" className="h-7 w-7">
              <path d="M4 18h6l3-8 4 14 3-10 2 4h6" fill="none" stroke="currentColor" className="text-accent" strokeWidth="2.6" strokeLinecap="round" strokeLinejoin="round" />
            </svg>
            Corvane
          </Link>
          {config().CORVANE_DEMO_MODE === "1" && (
            <p className="rounded-md border border-dashed border-line px-2 py-1 text-xs text-muted" title="All people, patients and data here are invented.">
              Demo data · {DEMO_HOSPITAL}
            </p>
          )}
          <NavLinks items={navItems(actor.grants, { demoMode: process.env.CORVANE_DEMO_MODE === "1" })} units={units} />
          <div className="ml-auto flex flex-wrap items-center gap-4">
            <UnitSwitcher units={units} censusUnitIds={unitsWhere(actor.grants, "census.view")} />
            <p className="text-sm">
              <span className="sr-only">Signed in as </span>
              <span className="font-bold">{actor.name}</span>
            </p>
            <SignOutButton />
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-7xl px-6 py-6">
        {children}
      </main>
      <IdleLock minutes={config().CORVANE_IDLE_MINUTES} />
    </>
  );
}
