"use client";
// Idle lock for shared clinical workstations: after `minutes` without input the session ends and the person
// returns to sign-in, which brings them back to this page afterwards. Activity also refreshes the server-side
// session (whose lifetime is the same idle period), so a closed or frozen tab lapses on the server as well.
import { signOut } from "next-auth/react";
import { useEffect, useRef, useState } from "react";

const WARN_SECONDS = 60;
const REFRESH_EVERY_MS = 60_000;

export function IdleLock({ minutes }: { minutes: number }) {
  const lastActivity = useRef(Date.now());
  const lastRefresh = useRef(Date.now());
  const [secondsLeft, setSecondsLeft] = useState<number | null>(null);

  useEffect(() => {
    const limitMs = minutes * 60_000;
    const onActivity = () => {
      lastActivity.current = Date.now();
      setSecondsLeft(null);
      if (Date.now() - lastRefresh.current > REFRESH_EVERY_MS) {
        lastRefresh.current = Date.now();
        void fetch("/api/auth/session", { cache: "no-store" });
      }
    };
    const events = ["pointerdown", "pointermove", "keydown", "wheel", "touchstart", "scroll"] as const;
    events.forEach((e) => window.addEventListener(e, onActivity, { passive: true }));
    const timer = window.setInterval(() => {
      const left = Math.ceil((limitMs - (Date.now() - lastActivity.current)) / 1000);
      if (left <= 0) {
        window.clearInterval(timer);
        const back = window.location.pathname + window.location.search;
        void signOut({ callbackUrl: `/signin?reason=idle&callbackUrl=${encodeURIComponent(back)}` });
      } else {
        setSecondsLeft(left <= WARN_SECONDS ? left : null);
      }
    }, 1000);
    return () => {
      window.clearInterval(timer);
      events.forEach((e) => window.removeEventListener(e, onActivity));
    };
  }, [minutes]);

  return (
    <div aria-live="polite" className="pointer-events-none fixed inset-x-0 bottom-4 z-40 flex justify-center">
      {secondsLeft !== null && (
        <p className="pointer-events-auto card px-4 py-3 shadow-lg">
          This workstation locks in <strong>{secondsLeft} s</strong> for inactivity. Move the mouse or press a key to
          stay signed in.
        </p>
      )}
    </div>
  );
}
