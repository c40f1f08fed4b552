// The demo Mailbox (administrators, demo mode only): what the local SMTP sink received — the escalations and
// reminders Corvane sent — and the outbox's delivery status. Outside demo mode mail goes to a real relay and this
// page shows nothing of it.
import Link from "next/link";
import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { unitsWhere } from "@/lib/auth/roles";
import { config } from "@/lib/config";
import { getReceived, listReceived, outboxStatus } from "@/lib/mail/mailbox";
import { mailboxQuerySchema } from "@/lib/mail/mailbox.validation";
import { formatLocal } from "@/lib/time";
import { listUnits } from "@/lib/units/repository";
import { OutboxPanel } from "@/components/mailbox/OutboxPanel";

export const metadata = { title: "Mailbox" };
const PAGE_SIZE = 25;

export default async function MailboxPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await guardPage("mailbox.view");
  if (config().CORVANE_DEMO_MODE !== "1") {
    return (
      <div className="space-y-3">
        <h1>Mailbox</h1>
        <p>The Mailbox exists only in demo mode. Outside it, Corvane sends its messages through the configured mail relay and keeps no copy here.</p>
      </div>
    );
  }
  const { page, id } = mailboxQuerySchema.parse(await searchParams);
  const unitIds = unitsWhere(actor.grants, "mailbox.view");
  const [list, opened, status, units] = await Promise.all([listReceived({ page, pageSize: PAGE_SIZE }), id ? getReceived(id) : null, outboxStatus(), listUnits()]);
  if (id && !opened) notFound();
  await auditAs(actor, {
    action: "mailbox.view",
    permission: "mailbox.view",
    target: opened ? { type: "mail_received", id: opened.id } : null,
    detail: { page },
  });
  const zone = units.find((u) => unitIds.includes(u.id))?.timeZone ?? "UTC";
  const pages = Math.max(1, Math.ceil(list.total / PAGE_SIZE));
  const href = (p: number, messageId?: string) => `/mailbox?page=${p}${messageId ? `&id=${messageId}` : ""}`;
  return (
    <div className="space-y-5">
      <div>
        <h1>Mailbox</h1>
        <p className="text-muted">
          Demo mode: messages Corvane sent, as the local mail sink on this machine received them (nothing leaves it).
          Newest first; times in {zone}.
        </p>
      </div>
      <OutboxPanel status={status} timeZone={zone} />
      {opened && (
        <section className="card p-4" aria-labelledby="message-heading">
          <h2 id="message-heading">{opened.subject ?? "(no subject)"}</h2>
          <dl className="mt-2 grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1 text-sm">
            <dt className="text-muted">Received</dt>
            <dd><time dateTime={opened.receivedAt}>{formatLocal(opened.receivedAt, zone)}</time></dd>
            <dt className="text-muted">From</dt>
            <dd>{opened.from ?? "—"}</dd>
            <dt className="text-muted">To</dt>
            <dd>{opened.to.join(", ")}</dd>
          </dl>
          <pre className="mt-4 whitespace-pre-wrap break-words rounded-md border border-line bg-raised p-4 font-sans text-sm">{opened.text ?? "(no text part)"}</pre>
          <p className="mt-3 text-sm"><Link href={href(page)}>Close message</Link></p>
        </section>
      )}
      <section className="card overflow-x-auto" aria-labelledby="received-heading">
        <h2 id="received-heading" className="px-4 pt-4">Received</h2>
        {list.messages.length === 0 ? (
          <p className="px-4 pb-4 pt-2 text-sm">No messages yet. Escalations and reminders appear here within a minute of being sent.</p>
        ) : (
          <table className="mt-2 text-sm">
            <thead>
              <tr>
                <th scope="col">Received</th>
                <th scope="col">To</th>
                <th scope="col">Subject</th>
              </tr>
            </thead>
            <tbody>
              {list.messages.map((m) => (
                <tr key={m.id} aria-current={m.id === opened?.id ? "true" : undefined} className={m.id === opened?.id ? "bg-raised" : undefined}>
                  <td className="whitespace-nowrap"><time dateTime={m.receivedAt}>{formatLocal(m.receivedAt, zone)}</time></td>
                  <td>{m.to.join(", ")}</td>
                  <td>
                    <Link href={href(page, m.id)}>{m.subject ?? "(no subject)"}</Link>
                    {m.id === opened?.id && <span className="ml-2 text-muted">(open)</span>}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
      <nav aria-label="Mailbox pages" className="flex items-center gap-4 text-sm">
        <span className="text-muted">{list.total} {list.total === 1 ? "message" : "messages"} · page {list.page} of {pages}</span>
        {list.page > 1 && <Link href={href(list.page - 1)}>Newer messages</Link>}
        {list.page < pages && <Link href={href(list.page + 1)}>Older messages</Link>}
      </nav>
    </div>
  );
}
