import Link from "next/link";
import { guardPage } from "@/lib/auth/guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { listPeople } from "@/lib/people/repository";
import { peopleQuerySchema } from "@/lib/people/people.validation";
import { listUnits } from "@/lib/units/repository";
import { formatLocal } from "@/lib/time";

export const metadata = { title: "People" };
const PAGE_SIZE = 25;

export default async function PeoplePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await guardPage("people.manage");
  const query = peopleQuerySchema.parse(await searchParams);
  const [result, units] = await Promise.all([listPeople({ page: query.page, pageSize: PAGE_SIZE, query: query.q }), listUnits()]);
  const unitName = new Map(units.map((u) => [u.id, u.name]));
  const zone = units[0]?.timeZone ?? "UTC";
  const pages = Math.max(1, Math.ceil(result.total / PAGE_SIZE));
  const pageHref = (p: number) => `/people?${new URLSearchParams({ ...(query.q ? { q: query.q } : {}), page: String(p) })}`;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <h1>People</h1>
          <p className="text-muted">Who can sign in, and their roles in each unit. Every change is recorded in the audit trail.</p>
        </div>
        <Link href="/people/new" className="btn-primary">Add a person</Link>
      </div>
      <form role="search" className="flex max-w-lg gap-2" action="/people">
        <label htmlFor="q" className="sr-only">Search people by name or e-mail</label>
        <input id="q" name="q" defaultValue={query.q ?? ""} placeholder="Search by name or e-mail" className="field-input" />
        <button type="submit" className="btn-secondary">Search</button>
      </form>
      <section className="card overflow-x-auto" aria-labelledby="people-heading">
        <h2 id="people-heading" className="sr-only">People</h2>
        <table>
          <thead>
            <tr>
              <th scope="col">Name</th>
              <th scope="col">E-mail</th>
              <th scope="col">Roles</th>
              <th scope="col">Status</th>
              <th scope="col">Last sign-in</th>
            </tr>
          </thead>
          <tbody>
            {result.people.length === 0 && (
              <tr><td colSpan={5} className="text-muted">No one matches “{query.q}”.</td></tr>
            )}
            {result.people.map((p) => (
              <tr key={p.id}>
                <th scope="row" className="border-b border-line px-3 py-2">
                  <Link href={`/people/${p.id}`}>{p.name}</Link>
                </th>
                <td className="font-mono text-sm">{p.email}</td>
                <td className="text-sm">
                  {p.grants.length === 0 ? <span className="text-muted">No roles</span> : (
                    <ul>
                      {p.grants.map((g) => (
                        <li key={`${g.unitId}:${g.role}`}>{ROLE_LABELS[g.role]} <span className="text-muted">· {unitName.get(g.unitId)}</span></li>
                      ))}
                    </ul>
                  )}
                </td>
                <td>{p.active ? "Active" : <span className="text-quiet"><span aria-hidden="true">⊘ </span>Deactivated</span>}</td>
                <td className="text-sm">{p.lastSignInAt ? formatLocal(p.lastSignInAt, zone) : <span className="text-muted">Never</span>}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      <nav aria-label="People pages" className="flex items-center gap-4 text-sm">
        <span className="text-muted">{result.total} {result.total === 1 ? "person" : "people"} · page {result.page} of {pages}</span>
        {result.page > 1 && <Link href={pageHref(result.page - 1)}>Previous page</Link>}
        {result.page < pages && <Link href={pageHref(result.page + 1)}>Next page</Link>}
      </nav>
    </div>
  );
}
