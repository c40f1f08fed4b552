"use client";
// Live events for one unit (new windows, flags, stream status; ids only — screens fetch details through their
// guarded routes). Every screen of a tab shares one EventSource on /api/live, opened by the first subscriber and
// closed with the last. EventSource reconnects by itself after a dropped connection (the server sends `retry`);
// when the browser gives up (an error answer, e.g. 401 after the session ended) the source is opened again later.
import { useEffect, useRef } from "react";
import { liveEventSchema, type LiveEvent } from "@/lib/live/events";

export type { LiveEvent };

const LIVE_URL = "/api/live";
const EVENT_TYPES = ["windows", "flags", "stream"] as const satisfies readonly LiveEvent["type"][];
/** Wait before opening a source the browser has closed. */
const REOPEN_AFTER_MS = 30_000;

type Listener = (event: LiveEvent) => void;

const listeners = new Set<Listener>();
let source: EventSource | null = null;
let reopenTimer: ReturnType<typeof setTimeout> | undefined;

function deliver(message: MessageEvent<string>) {
  let data: unknown;
  try {
    data = JSON.parse(message.data);
  } catch {
    return;
  }
  const parsed = liveEventSchema.safeParse(data);
  if (!parsed.success) return;
  for (const fn of listeners) fn(parsed.data);
}

function open() {
  if (source || typeof EventSource === "undefined") return;
  const s = new EventSource(LIVE_URL);
  for (const type of EVENT_TYPES) s.addEventListener(type, deliver as EventListener);
  s.onerror = () => {
    if (s.readyState !== EventSource.CLOSED) return; // the browser is reconnecting on its own
    close();
    if (listeners.size) reopenTimer = setTimeout(open, REOPEN_AFTER_MS);
  };
  source = s;
}

function close() {
  clearTimeout(reopenTimer);
  reopenTimer = undefined;
  source?.close();
  source = null;
}

/**
 * Calls `onEvent` for every live event of `unitId` while the component is mounted. The callback may change between
 * renders without reopening anything.
 */
export function useLiveEvents(unitId: string, onEvent: (event: LiveEvent) => void): void {
  const callback = useRef(onEvent);
  useEffect(() => {
    callback.current = onEvent;
  });
  useEffect(() => {
    const listener: Listener = (e) => {
      if (e.unitId === unitId) callback.current(e);
    };
    listeners.add(listener);
    open();
    return () => {
      listeners.delete(listener);
      if (!listeners.size) close();
    };
  }, [unitId]);
}
