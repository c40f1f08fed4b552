// The printed page's frame: browsers repeat a table's header group at the top of every printed page, so the
// caution, the unit and the night head each sheet. On screen it is plain blocks; the table is presentational.
export function HandoffFrame({ header, children }: { header: React.ReactNode; children: React.ReactNode }) {
  return (
    <table role="presentation" className="handoff-page block w-full print:table print:text-[10pt] print:leading-snug">
      <thead className="block print:table-header-group">
        <tr className="block print:table-row">
          <td className="block border-0 p-0 print:table-cell print:pb-3">{header}</td>
        </tr>
      </thead>
      <tbody className="block print:table-row-group">
        <tr className="block print:table-row">
          <td className="block border-0 p-0 print:table-cell">{children}</td>
        </tr>
      </tbody>
    </table>
  );
}
