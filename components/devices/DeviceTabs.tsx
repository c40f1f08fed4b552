"use client";
// The tabs of one device: its record (token, bed), its stream health and its maintenance log. Links, so each tab
// has its own address and the browser's back button works.
import Link from "next/link";
import { usePathname } from "next/navigation";

export function DeviceTabs({ base }: { base: string }) {
  const pathname = usePathname();
  const tabs = [
    { href: base, label: "Device" },
    { href: `${base}/health`, label: "Stream health" },
    { href: `${base}/maintenance`, label: "Maintenance log" },
  ];
  return (
    <nav aria-label="Device" className="border-b border-line">
      <ul className="flex flex-wrap gap-1">
        {tabs.map((t) => {
          const active = pathname === t.href;
          return (
            <li key={t.href}>
              <Link
                href={t.href}
                aria-current={active ? "page" : undefined}
                className={`-mb-px block border-b-2 px-3 py-2 font-bold hover:no-underline ${active ? "border-accent text-ink" : "border-transparent text-muted hover:text-ink"}`}
              >
                {t.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
