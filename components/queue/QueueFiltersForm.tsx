// The queue's filters as a plain GET form: the choice lives in the URL (shareable, survives a reload) and works
// without JavaScript. Every filter is optional; "All" leaves it out.
import Link from "next/link";
import { QUEUE_STATES, SEVERITIES, type QueueFilters } from "@/lib/queue/queue.validation";
import { Notice } from "@/components/Notice";

export function QueueFiltersForm({ unitId, beds, filters, invalid }: { unitId: string; beds: string[]; filters: QueueFilters; invalid: boolean }) {
  const active = Boolean(filters.state || filters.severity || filters.bed);
  return (
    <form method="get" action={`/units/${unitId}/queue`} aria-label="Filter the queue" className="card flex flex-wrap items-end gap-x-4 gap-y-3 px-4 py-3">
      {invalid && (
        <div className="basis-full">
          <Notice tone="info">A filter in the address was not understood and is not applied.</Notice>
        </div>
      )}
      <div>
        <label htmlFor="filter-state" className="mb-1 block text-sm font-bold">State</label>
        <select id="filter-state" name="state" defaultValue={filters.state ?? ""} className="field-input">
          <option value="">All waiting or standing</option>
          {QUEUE_STATES.map((s) => <option key={s} value={s}>{s}</option>)}
        </select>
      </div>
      <div>
        <label htmlFor="filter-severity" className="mb-1 block text-sm font-bold">Severity</label>
        <select id="filter-severity" name="severity" defaultValue={filters.severity ?? ""} className="field-input">
          <option value="">All</option>
          {SEVERITIES.map((s) => <option key={s} value={s}>{s}</option>)}
        </select>
      </div>
      <div>
        <label htmlFor="filter-bed" className="mb-1 block text-sm font-bold">Bed</label>
        <select id="filter-bed" name="bed" defaultValue={filters.bed ?? ""} className="field-input">
          <option value="">All beds</option>
          {beds.map((b) => <option key={b} value={b}>{b}</option>)}
        </select>
      </div>
      <button type="submit" className="btn-secondary">Apply filters</button>
      {active && <Link href={`/units/${unitId}/queue`} className="self-center">Clear filters</Link>}
    </form>
  );
}
