// Device registry of a unit (biomedical engineers): every device with its bed, stream state, token state and next
// maintenance due; decommissioned devices apart, below. No clinical values: bed labels only. Filters live in the URL.
import Link from "next/link";
import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { devicesOfUnit, type DeviceListItemDTO } from "@/lib/devices/registry";
import { REGISTRY_STATUS_FILTER_LABELS, REGISTRY_STATUS_FILTERS, registryFilterSchema } from "@/lib/devices/registry.validation";
import { formatLocal } from "@/lib/time";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { Notice } from "@/components/Notice";
import { StreamStateTag } from "@/components/devices/StreamStateTag";
import { TOKEN_STATE_WORDS } from "@/components/devices/registry/token-words";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Device registry" };

const STATUS_WORD = { active: "In service", maintenance: "In maintenance", decommissioned: "Decommissioned" } as const;

function DueDate({ d }: { d: DeviceListItemDTO }) {
  if (!d.nextMaintenanceDue) return <span className="text-muted">—<span className="sr-only">none set</span></span>;
  return (
    <span className={d.maintenanceOverdue ? "font-bold" : undefined}>
      <time dateTime={d.nextMaintenanceDue}>{d.nextMaintenanceDue}</time>
      {d.maintenanceOverdue && (
        <span className="ml-2 inline-flex items-center gap-1 rounded-md border border-dashed border-muted px-1.5 text-sm">
          <span aria-hidden="true">◷</span>overdue
        </span>
      )}
    </span>
  );
}

function DeviceTable({ unitId, devices, caption, timeZone, decommissioned }: { unitId: string; devices: DeviceListItemDTO[]; caption: string; timeZone: string; decommissioned?: boolean }) {
  return (
    <table>
      <caption className="sr-only">{caption}</caption>
      <thead>
        <tr>
          <th scope="col">Serial</th>
          <th scope="col">Model</th>
          {decommissioned ? (
            <th scope="col">Decommissioned</th>
          ) : (
            <>
              <th scope="col">Bed</th>
              <th scope="col">Stream</th>
              <th scope="col">Token</th>
              <th scope="col">Next maintenance due</th>
            </>
          )}
        </tr>
      </thead>
      <tbody>
        {devices.map((d) => (
          <tr key={d.id} className={decommissioned ? "text-muted" : undefined}>
            <th scope="row" className="border-b border-line px-3 py-2 text-left">
              <Link href={`/units/${unitId}/devices/${d.id}`} className="font-mono font-bold">{d.serial}</Link>
              {d.status === "maintenance" && <span className="block text-sm font-normal text-muted">{STATUS_WORD.maintenance}</span>}
            </th>
            <td>
              {d.model}
              <span className="block text-sm text-muted">{d.manufacturer} · firmware <span className="font-mono">{d.firmware}</span></span>
            </td>
            {decommissioned ? (
              <td>{d.decommissionedAt ? <time dateTime={d.decommissionedAt}>{formatLocal(d.decommissionedAt, timeZone)}</time> : "—"}</td>
            ) : (
              <>
                <td className="font-mono">{d.bedLabel ?? <span className="font-sans text-muted">Not on a bed</span>}</td>
                <td>
                  <StreamStateTag state={d.stream} detail={d.lastBeatAt && d.stream !== "live" ? `last beat ${formatLocal(d.lastBeatAt, timeZone)}` : undefined} />
                </td>
                <td>
                  {TOKEN_STATE_WORDS[d.token.state]}
                  {d.token.previousValidUntil && <span className="block text-sm text-muted">old token until {formatLocal(d.token.previousValidUntil, timeZone)}</span>}
                </td>
                <td><DueDate d={d} /></td>
              </>
            )}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export default async function DeviceRegistryPage({ params, searchParams }: {
  params: Promise<{ unitId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  const actor = await guardPage("devices.view", unitId.data);
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  // A filter that does not parse (an edited URL) is dropped, with a note, rather than failing the page.
  const parsed = registryFilterSchema.safeParse(raw);
  const filter = parsed.success ? parsed.data : { status: "all" as const, q: "" };
  const registry = await devicesOfUnit(unitId.data, new Date(), filter);
  if (!registry) notFound();
  const canManage = can(actor.grants, "devices.manage", unitId.data);
  const base = `/units/${registry.unit.id}/devices`;
  const filtered = filter.status !== "all" || filter.q !== "";
  const tz = registry.unit.timeZone;
  const showActive = filter.status !== "decommissioned";
  const showDecommissioned = filter.status === "all" || filter.status === "decommissioned";
  return (
    <div className="space-y-5">
      <PageHeader
        eyebrow="Device registry"
        title={registry.unit.name}
        aside={
          canManage && (
            <div className="flex flex-wrap gap-3">
              <Link href={`${base}/new`} className="btn-primary">Register a device</Link>
              <Link href={`${base}/import`} className="btn-secondary">Import from CSV</Link>
            </div>
          )
        }
      />

      <form method="get" action={base} aria-label="Filter the devices" className="card flex flex-wrap items-end gap-x-4 gap-y-3 px-4 py-3">
        {!parsed.success && (
          <div className="basis-full">
            <Notice tone="info">A filter in the address was not understood and is not applied.</Notice>
          </div>
        )}
        <div>
          <label htmlFor="filter-status" className="mb-1 block text-sm font-bold">Status</label>
          <select id="filter-status" name="status" defaultValue={filter.status} className="field-input">
            {REGISTRY_STATUS_FILTERS.map((s) => <option key={s} value={s}>{REGISTRY_STATUS_FILTER_LABELS[s]}</option>)}
          </select>
        </div>
        <div className="min-w-56 flex-1">
          <label htmlFor="filter-q" className="mb-1 block text-sm font-bold">Serial or model contains</label>
          <input id="filter-q" name="q" type="search" defaultValue={filter.q} maxLength={100} className="field-input" />
        </div>
        <button type="submit" className="btn-secondary">Apply filters</button>
        {filtered && <Link href={base} className="self-center">Clear filters</Link>}
      </form>

      {showActive && (
        <section aria-labelledby="devices-heading" className="card overflow-x-auto">
          <div className="flex flex-wrap items-baseline justify-between gap-2 px-4 pt-4">
            <h2 id="devices-heading">In service and in maintenance</h2>
            <p className="text-sm text-muted">
              {registry.devices.length} device{registry.devices.length === 1 ? "" : "s"}{filtered ? " matching the filters" : ""} · as of {formatLocal(registry.asOf, tz)}
            </p>
          </div>
          {registry.devices.length ? (
            <DeviceTable unitId={registry.unit.id} devices={registry.devices} timeZone={tz} caption={`Devices of ${registry.unit.name} in service or in maintenance`} />
          ) : (
            <p className="px-4 pb-4 pt-2 text-muted">
              {filtered ? "No device matches these filters." : canManage ? "No device is registered in this unit yet. Register one, or import a list from CSV." : "No device is registered in this unit yet."}
            </p>
          )}
        </section>
      )}

      {showDecommissioned && (filter.status === "decommissioned" || registry.decommissioned.length > 0) && (
        <section aria-labelledby="decommissioned-heading" className="card overflow-x-auto">
          <div className="px-4 pt-4">
            <h2 id="decommissioned-heading">Decommissioned</h2>
            <p className="text-sm text-muted">Out of service for good; kept with their bed history and maintenance log.</p>
          </div>
          {registry.decommissioned.length ? (
            <DeviceTable unitId={registry.unit.id} devices={registry.decommissioned} timeZone={tz} caption={`Decommissioned devices of ${registry.unit.name}`} decommissioned />
          ) : (
            <p className="px-4 pb-4 pt-2 text-muted">No decommissioned device{filtered ? " matches these filters" : ""}.</p>
          )}
        </section>
      )}
    </div>
  );
}
