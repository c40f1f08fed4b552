// What an import file must look like: the columns with an example value each, the quoting rules in plain words,
// and a template to download (a data: URL built from the same example as the table, so the two agree).
import { IMPORT_COLUMNS, MAX_IMPORT_ROWS } from "@/lib/devices/import.validation";
import { IMPORT_COLUMN_GUIDE, IMPORT_TEMPLATE_CSV } from "./template";

const TEMPLATE_HREF = `data:text/csv;charset=utf-8,${encodeURIComponent(IMPORT_TEMPLATE_CSV)}`;

export function ImportFileFormat() {
  return (
    <section aria-labelledby="file-format" className="card space-y-3 p-4">
      <h2 id="file-format">What the file must look like</h2>
      <ul className="list-disc space-y-1 pl-5">
        <li>A CSV file in UTF-8 (&ldquo;CSV UTF-8&rdquo; in a spreadsheet program), with commas between values.</li>
        <li>The first row names the columns below, in any order and any case; no other columns.</li>
        <li>One row per device, at most {MAX_IMPORT_ROWS.toLocaleString("en")} devices and 1 MB per file.</li>
        <li>
          A value containing a comma, a double quote or a line break goes in double quotes, and a double quote inside it is
          written twice: <code className="font-mono">&quot;Spare, &quot;&quot;B&quot;&quot; shelf&quot;</code>.
        </li>
        <li>Devices are imported without stream tokens: issue each token from the device&apos;s page afterwards.</li>
      </ul>
      <div className="overflow-x-auto">
        <table>
          <caption className="sr-only">Columns of the import file</caption>
          <thead>
            <tr>
              <th scope="col">Column</th>
              <th scope="col">Needed</th>
              <th scope="col">What it holds</th>
              <th scope="col">Example</th>
            </tr>
          </thead>
          <tbody>
            {IMPORT_COLUMNS.map((c) => (
              <tr key={c}>
                <th scope="row" className="border-b border-line px-3 py-2 font-mono text-ink">{c}</th>
                <td>{IMPORT_COLUMN_GUIDE[c].required ? "Required" : "Optional"}</td>
                <td>{IMPORT_COLUMN_GUIDE[c].what}</td>
                <td className="font-mono text-sm">{IMPORT_COLUMN_GUIDE[c].example}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <details>
        <summary className="cursor-pointer">The example as CSV text</summary>
        <pre className="mt-2 overflow-x-auto rounded-md border border-line bg-surface p-3 font-mono text-sm">{IMPORT_TEMPLATE_CSV}</pre>
      </details>
      <p>
        <a href={TEMPLATE_HREF} download="corvane-device-import-template.csv">
          Download the template (CSV, {IMPORT_COLUMNS.length} columns, 2 example rows)
        </a>
      </p>
    </section>
  );
}
