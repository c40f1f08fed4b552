"use client";
// When the page was printed (set as the print dialog opens, so a page left open still prints the right time) and
// how current its data are, in the unit's zone.
import { formatInTimeZone } from "date-fns-tz";
import { useEffect, useState } from "react";
import { flushSync } from "react-dom";

const FORMAT = "EEE d MMM yyyy, HH:mm zzz";

export function PrintStamp({ asOf, timeZone }: { asOf: string; timeZone: string }) {
  const [printedAt, setPrintedAt] = useState<string | null>(null);
  useEffect(() => {
    // The browser lays out the printout right after this event: the new time must be in the DOM by then.
    const onBeforePrint = () => flushSync(() => setPrintedAt(new Date().toISOString()));
    window.addEventListener("beforeprint", onBeforePrint);
    return () => window.removeEventListener("beforeprint", onBeforePrint);
  }, []);
  return (
    <p className="text-sm text-muted">
      Data as of {formatInTimeZone(asOf, timeZone, FORMAT)}
      <span className="hidden print:inline"> · printed {formatInTimeZone(printedAt ?? asOf, timeZone, FORMAT)}</span>
    </p>
  );
}
