"use client";
// A client table's data, rendered on the server first and then kept current with SWR: every `refreshMs`, and soon
// after a live event of the unit, coalesced so a busy unit (or a flapping device) does not refetch per event.
import { useCallback, useEffect, useRef, useState } from "react";
import useSWR from "swr";
import { useLiveEvents, type LiveEvent } from "./useLiveEvents";

export interface LiveRefreshOptions {
  /** What the request is, for the error it throws. */
  what: string;
  refreshMs: number;
  /** After a live event, wait this long for more before refetching, and refetch at most every `minGapMs`. */
  settleMs: number;
  minGapMs: number;
  /** The live events that call for a refetch; all of them when left out. */
  refetchOn?: (event: LiveEvent) => boolean;
}

/** The latest data (the server's until the first fetch) and when the last fetch failed (null once one succeeds). */
export function useLiveRefresh<T>(unitId: string, url: string, initial: T, options: LiveRefreshOptions): { data: T; failedAt: Date | null } {
  const { what, refreshMs, settleMs, minGapMs, refetchOn } = options;
  const [failedAt, setFailedAt] = useState<Date | null>(null);
  /** When the table last asked the server (the server render counts: the page has just read it). */
  const lastFetch = useRef(0);
  useEffect(() => {
    lastFetch.current = Date.now();
  }, []);
  const fetcher = useCallback(
    async (u: string): Promise<T> => {
      const res = await fetch(u, { cache: "no-store" });
      if (!res.ok) throw new Error(`${what} request failed (${res.status})`);
      return (await res.json()) as T;
    },
    [what],
  );
  const { data, mutate } = useSWR(url, fetcher, {
    fallbackData: initial,
    refreshInterval: refreshMs,
    revalidateOnFocus: false,
    revalidateOnMount: false,
    keepPreviousData: true,
    onSuccess: () => {
      lastFetch.current = Date.now();
      setFailedAt(null);
    },
    onError: () => {
      lastFetch.current = Date.now();
      setFailedAt(new Date());
    },
  });

  const pending = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  useEffect(() => () => clearTimeout(pending.current), []);
  const onLive = useCallback(
    (e: LiveEvent) => {
      if (pending.current || (refetchOn && !refetchOn(e))) return;
      const wait = Math.max(settleMs, minGapMs - (Date.now() - lastFetch.current));
      pending.current = setTimeout(() => {
        pending.current = undefined;
        void mutate();
      }, wait);
    },
    [mutate, refetchOn, settleMs, minGapMs],
  );
  useLiveEvents(unitId, onLive);

  return { data: data ?? initial, failedAt };
}

/** The status line under "Last refreshed": empty while fetches succeed, a circled "!" and both times after a failure. */
export function RefreshFailedNotice({ failedAt, dataOf }: { failedAt: string | null; dataOf: string }) {
  return (
    <div role="status">
      {failedAt && (
        <p className="mt-1 flex items-center gap-2 rounded-md border border-problem bg-problem-surface px-2 py-1 text-ink">
          <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4 shrink-0 text-problem">
            <circle cx="10" cy="10" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.8" />
            <path d="M10 5v6m0 3.5v.5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
          </svg>
          Refresh failed at {failedAt}; the table still shows the data of {dataOf}.
        </p>
      )}
    </div>
  );
}
