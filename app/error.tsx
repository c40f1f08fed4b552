"use client";
// Unexpected errors (bugs, an unreachable database). Expected failures are shown near their fields instead.
export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <main id="main" className="mx-auto max-w-xl px-6 py-16">
      <div className="card p-8">
        <h1>Something went wrong</h1>
        <p className="mt-3 text-muted">
          Corvane could not show this screen. Nothing you entered was saved unless you saw a confirmation. If it keeps
          happening, give this reference to support: <code className="font-mono text-ink">{error.digest ?? "none"}</code>.
        </p>
        <p className="mt-6"><button type="button" className="btn-primary" onClick={reset}>Try again</button></p>
      </div>
    </main>
  );
}
