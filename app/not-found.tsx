import Link from "next/link";

export default function NotFound() {
  return (
    <main id="main" className="mx-auto max-w-xl px-6 py-16">
      <div className="card p-8">
        <h1>Nothing here</h1>
        <p className="mt-3 text-muted">That page or record does not exist, or the link is incomplete.</p>
        <p className="mt-6"><Link href="/" className="btn-primary">Go to your first screen</Link></p>
      </div>
    </main>
  );
}
