// Delivery status of the outbox: counts by status and the latest failed attempts, so a mail outage is visible.
import type { OutboxStatusDTO } from "@/lib/mail/mailbox";
import { formatLocal } from "@/lib/time";

const KIND_TEXT = { escalation: "Escalation", reminder: "Reminder", reminder_escalation: "Reminder to clinicians" } as const;

export function OutboxPanel({ status, timeZone }: { status: OutboxStatusDTO; timeZone: string }) {
  return (
    <section className="card p-4" aria-labelledby="outbox-heading">
      <h2 id="outbox-heading">Outbox</h2>
      <p className="mt-1 text-sm text-muted">Every message is written here first and delivered by the mail worker each minute; a failed attempt is retried after 1, 2, 4 … minutes (at most 60), and given up after 12 attempts.</p>
      <dl className="mt-3 flex flex-wrap gap-6 text-sm">
        <div><dt className="text-muted">Waiting to be sent</dt><dd className="text-lg font-bold">{status.queued}</dd></div>
        <div><dt className="text-muted">Sent</dt><dd className="text-lg font-bold">{status.sent}</dd></div>
        <div><dt className="text-muted">Given up</dt><dd className="text-lg font-bold">{status.failed}</dd></div>
      </dl>
      {status.failures.length > 0 ? (
        <div className="mt-4 overflow-x-auto">
          <table className="text-sm">
            <caption className="text-left font-bold">Latest failed attempts</caption>
            <thead>
              <tr>
                <th scope="col">#</th>
                <th scope="col">Kind</th>
                <th scope="col">Status</th>
                <th scope="col">Attempts</th>
                <th scope="col">Last error</th>
                <th scope="col">Next attempt</th>
              </tr>
            </thead>
            <tbody>
              {status.failures.map((f) => (
                <tr key={f.id}>
                  <td className="font-mono">{f.id}</td>
                  <td>{KIND_TEXT[f.kind]}</td>
                  <td>{f.status === "failed" ? <strong>Given up</strong> : "Retrying"}</td>
                  <td>{f.attempts}</td>
                  <td className="max-w-md break-words font-mono text-xs">{f.lastError}</td>
                  <td className="whitespace-nowrap">{f.nextAttemptAt ? <time dateTime={f.nextAttemptAt}>{formatLocal(f.nextAttemptAt, timeZone)}</time> : "—"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : (
        <p className="mt-3 text-sm">No failed attempts waiting.</p>
      )}
    </section>
  );
}
