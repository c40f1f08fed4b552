"use client";
// Unit switcher: a disclosure of links (no navigation on a mere change of selection, WCAG 3.2.2).
import Link from "next/link";
import { useParams, usePathname } from "next/navigation";

export interface SwitcherUnit {
  id: string;
  name: string;
  roles: string[];
}

export function currentUnitId(params: { unitId?: string | string[] }, units: SwitcherUnit[]): string | undefined {
  const p = typeof params.unitId === "string" ? params.unitId : undefined;
  return units.some((u) => u.id === p) ? p : units[0]?.id;
}

export function UnitSwitcher({ units, censusUnitIds }: { units: SwitcherUnit[]; censusUnitIds: string[] }) {
  const params = useParams<{ unitId?: string }>();
  const pathname = usePathname();
  const current = units.find((u) => u.id === currentUnitId(params, units));
  if (!current) return null;
  const hrefFor = (id: string) => {
    // Stay on the same screen in the other unit when the path is unit-scoped; else open that unit's census.
    if (params.unitId && pathname.startsWith(`/units/${params.unitId}/`)) return pathname.replace(`/units/${params.unitId}/`, `/units/${id}/`);
    return `/units/${id}/census`;
  };
  const roleText = <span className="text-muted">{current.roles.join(", ")}</span>;
  const others = units.filter((u) => u.id !== current.id && censusUnitIds.includes(u.id));
  if (!others.length) {
    return (
      <p className="text-sm">
        <span className="font-bold">{current.name}</span> · {roleText}
      </p>
    );
  }
  return (
    <details className="relative text-sm">
      <summary className="cursor-pointer list-none rounded-md border border-line px-3 py-2 hover:border-accent">
        <span className="sr-only">Current unit: </span>
        <span className="font-bold">{current.name}</span> · {roleText} <span aria-hidden="true">▾</span>
      </summary>
      <ul className="card absolute right-0 z-30 mt-1 min-w-64 p-1 shadow-lg" aria-label="Switch unit">
        {others.map((u) => (
          <li key={u.id}>
            <Link href={hrefFor(u.id)} className="block rounded px-3 py-2 text-ink hover:bg-raised hover:no-underline">
              {u.name} <span className="text-muted">· {u.roles.join(", ")}</span>
            </Link>
          </li>
        ))}
      </ul>
    </details>
  );
}
