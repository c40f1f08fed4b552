// Checkbox grid of units × roles. Units the acting admin does not administer are shown read-only.
import { ROLES, ROLE_LABELS, type Grant } from "@/lib/auth/roles";
import { FieldError } from "@/components/FieldError";

export interface GridUnit {
  id: string;
  name: string;
  editable: boolean;
}

export function RolesGrid({ units, grants, errors }: { units: GridUnit[]; grants: Grant[]; errors?: string[] }) {
  const has = (unitId: string, role: string) => grants.some((g) => g.unitId === unitId && g.role === role);
  return (
    <fieldset aria-describedby="grants-error">
      <legend className="mb-2 font-bold">Roles by unit</legend>
      <div className="overflow-x-auto rounded-md border border-line">
        <table>
          <thead>
            <tr>
              <th scope="col">Unit</th>
              {ROLES.map((r) => (
                <th scope="col" key={r} className="text-center">{ROLE_LABELS[r]}</th>
              ))}
            </tr>
          </thead>
          <tbody>
            {units.map((u) => (
              <tr key={u.id}>
                <th scope="row" className="border-b border-line px-3 py-2 text-ink">
                  {u.name}
                  {!u.editable && <span className="block text-xs font-normal text-muted">not administered by you</span>}
                </th>
                {ROLES.map((r) => (
                  <td key={r} className="text-center">
                    <input
                      type="checkbox"
                      name={u.editable ? "grants" : undefined}
                      value={`${u.id}:${r}`}
                      defaultChecked={has(u.id, r)}
                      disabled={!u.editable}
                      aria-label={`${ROLE_LABELS[r]} in ${u.name}`}
                      className="h-5 w-5 accent-accent"
                    />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <FieldError id="grants-error" errors={errors} />
    </fieldset>
  );
}
