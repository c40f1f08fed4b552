"use client";
// The Review queue's list: one card per flag, oldest first. Rendered on the server first, then kept current with
// SWR on the queue route: every minute, and soon after a live "flags" or "windows" event of the unit (coalesced, so
// a busy unit does not refetch per event). Each fetch is an audited read. Severity and state are words with shapes,
// never colour alone; waiting time is a shape and words against the unit's target.
import Link from "next/link";
import { useCallback, useEffect, useRef, useState } from "react";
import useSWR from "swr";
import { useLiveEvents } from "@/components/live/useLiveEvents";
import { ACK_REASON_LABELS } from "@/lib/queue/queue.validation";
import type { ClinicianDTO, QueueDTO, QueueFlagDTO } from "@/lib/queue/repository";
import { FlagActions } from "./FlagActions";
import { QueueChart } from "./QueueChart";
import { clock, waitingWords, windowHref } from "./format";
import { SeverityTag } from "@/components/flags/SeverityTag";

const REFRESH_MS = 60_000;
/** After a live event, wait this long for more before refetching. */
const EVENT_SETTLE_MS = 2_000;

async function fetchQueue(url: string): Promise<QueueDTO> {
  const res = await fetch(url, { cache: "no-store" });
  if (!res.ok) throw new Error(`queue request failed (${res.status})`);
  return (await res.json()) as QueueDTO;
}


const STATE_SHAPES: Record<QueueFlagDTO["state"], string> = { open: "○", acknowledged: "◐", escalated: "▲", resolved: "●" };

function StateTag({ state }: { state: QueueFlagDTO["state"] }) {
  return (
    <span className="inline-flex items-center gap-1 rounded border border-line px-1.5 text-sm">
      <span aria-hidden="true">{STATE_SHAPES[state]}</span>
      <span className="sr-only">State: </span>{state}
    </span>
  );
}

function Waiting({ flag, target }: { flag: QueueFlagDTO; target: number }) {
  return (
    <p className={`inline-flex items-center gap-1.5 ${flag.overTarget ? "font-bold text-ink" : "text-muted"}`}>
      <span aria-hidden="true">{flag.overTarget ? "⧗" : "⧖"}</span>
      <span>{waitingWords(flag, target)}</span>
    </p>
  );
}

function LastTransition({ flag, timeZone }: { flag: QueueFlagDTO; timeZone: string }) {
  const t = flag.lastTransition;
  if (!t) return <p className="text-sm text-muted">No decision yet.</p>;
  return (
    <p className="text-sm">
      <span className="text-muted">Last: </span>
      {t.actorName ?? "Corvane (automatically)"} — {t.from} → {t.to} at <time dateTime={t.at}>{clock(t.at, timeZone)}</time>
      {t.reason && <> · reason: {ACK_REASON_LABELS[t.reason].toLowerCase()}</>}
      {t.recipientName && <> · to {t.recipientName}</>}
      {t.note && <span className="block text-muted">“{t.note}”</span>}
    </p>
  );
}

function FlagCard({ flag, queue, canAct, clinicians, refresh }: { flag: QueueFlagDTO; queue: QueueDTO; canAct: boolean; clinicians: ClinicianDTO[]; refresh: () => void }) {
  const tz = queue.unit.timeZone;
  const headingId = `flag-${flag.id}`;
  return (
    <li>
      <article aria-labelledby={headingId} className={`card grid gap-4 p-4 lg:grid-cols-[minmax(0,1.2fr)_minmax(0,1fr)_minmax(16rem,0.8fr)] ${flag.overTarget ? "border-l-4 border-l-caution" : ""}`}>
        <div className="space-y-1.5">
          <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
            <SeverityTag severity={flag.severity} />
            <StateTag state={flag.state} />
          </div>
          <h3 id={headingId} className="text-lg">
            <span className="font-mono">{flag.bedLabel}</span> · {flag.ruleLabel}
          </h3>
          <p>
            <Link href={`/stays/${flag.stayId}/night`} className="font-bold">
              {flag.displayName}<span className="sr-only"> — Night review</span>
            </Link>
            <span className="text-muted"> · </span>
            <Link href={windowHref(flag.stayId, flag.firstWindowStart)}>
              Window detail<span className="sr-only"> of the first flagged window, bed {flag.bedLabel}</span>
            </Link>
          </p>
          <Waiting flag={flag} target={queue.unit.ackTargetMinutes} />
          <p className="text-sm">
            Condition from <time dateTime={flag.conditionFrom}>{clock(flag.conditionFrom, tz)}</time>
            {flag.conditionTo ? <> to <time dateTime={flag.conditionTo}>{clock(flag.conditionTo, tz)}</time> (ended)</> : " — still holding"}
            <span className="text-muted"> · raised {clock(flag.raisedAt, tz)}</span>
          </p>
          {flag.previous && (
            <p className="text-sm">
              <span aria-hidden="true">↻ </span>Recurs after an earlier flag ({flag.previous.state}, raised {clock(flag.previous.raisedAt, tz)}).
            </p>
          )}
          <LastTransition flag={flag} timeZone={tz} />
        </div>
        <QueueChart chart={flag.chart} timeZone={tz} />
        <div>{canAct ? <FlagActions flag={flag} clinicians={clinicians} refresh={refresh} /> : null}</div>
      </article>
    </li>
  );
}

export function QueueList({ initial, canAct, clinicians }: { initial: QueueDTO; canAct: boolean; clinicians: ClinicianDTO[] }) {
  const params = new URLSearchParams(Object.entries(initial.filters).filter((e): e is [string, string] => typeof e[1] === "string"));
  const url = `/api/units/${initial.unit.id}/queue${params.size ? `?${params}` : ""}`;
  const [failed, setFailed] = useState(false);
  const { data, mutate } = useSWR(url, fetchQueue, {
    fallbackData: initial,
    refreshInterval: REFRESH_MS,
    revalidateOnMount: false,
    onError: () => setFailed(true),
    onSuccess: () => setFailed(false),
  });
  const queue = data ?? initial;
  const settle = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(settle.current), []);
  const onLive = useCallback(
    (e: { type: string }) => {
      if (e.type !== "flags" && e.type !== "windows") return;
      clearTimeout(settle.current);
      settle.current = setTimeout(() => void mutate(), EVENT_SETTLE_MS);
    },
    [mutate],
  );
  useLiveEvents(initial.unit.id, onLive);
  const refresh = useCallback(() => void mutate(), [mutate]);
  const tz = queue.unit.timeZone;
  const over = queue.flags.filter((f) => f.overTarget && !f.waitingStopped).length;

  return (
    <section aria-labelledby="queue-heading" className="space-y-3">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h2 id="queue-heading">
          {queue.flags.length === 1 ? "1 flag" : `${queue.flags.length} flags`}, oldest first
          {over > 0 && <span className="font-normal text-muted"> · {over} waiting past the target</span>}
        </h2>
        <div className="text-sm text-muted" role="status">
          Last refreshed <time dateTime={queue.asOf}>{clock(queue.asOf, tz)}</time> · refreshes every minute and on new flags
          {failed && <span className="block text-ink"><span aria-hidden="true">✕ </span>Refresh failed; the list shows the data of {clock(queue.asOf, tz)}.</span>}
        </div>
      </div>
      {queue.flags.length === 0 ? (
        <p className="card px-4 py-6 text-muted">No flags awaiting a decision{initial.filters.state || initial.filters.severity || initial.filters.bed ? " with these filters" : ""}.</p>
      ) : (
        <ol className="space-y-3">
          {queue.flags.map((f) => (
            <FlagCard key={f.id} flag={f} queue={queue} canAct={canAct} clinicians={clinicians} refresh={refresh} />
          ))}
        </ol>
      )}
    </section>
  );
}
