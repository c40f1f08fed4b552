"use client";
import Link from "next/link";
import { useParams, usePathname } from "next/navigation";
import { currentUnitId, type SwitcherUnit } from "./UnitSwitcher";

export interface NavItem {
  label: string;
  /** A fixed path, or a unit-scoped screen resolved against the current unit. */
  href: string | { unitScreen: string; unitIds: string[] };
  matchPrefix: string;
}

export function NavLinks({ items, units }: { items: NavItem[]; units: SwitcherUnit[] }) {
  const pathname = usePathname();
  const params = useParams<{ unitId?: string }>();
  const unitId = currentUnitId(params, units);
  return (
    <nav aria-label="Main">
      <ul className="flex flex-wrap gap-1">
        {items.map((item) => {
          let href: string;
          if (typeof item.href === "string") href = item.href;
          else {
            const id = unitId && item.href.unitIds.includes(unitId) ? unitId : item.href.unitIds[0];
            href = `/units/${id}/${item.href.unitScreen}`;
          }
          const active = pathname === href || new RegExp(item.matchPrefix).test(pathname);
          return (
            <li key={item.label}>
              <Link
                href={href}
                aria-current={active ? "page" : undefined}
                className={`block rounded-md px-3 py-2 font-bold hover:no-underline ${
                  active ? "bg-raised text-ink underline decoration-accent decoration-2 underline-offset-8" : "text-muted hover:text-ink"
                }`}
              >
                {item.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
