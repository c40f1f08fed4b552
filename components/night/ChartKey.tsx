// How to read the Night review's charts: every mark explained in words beside a drawn sample of it.
export function ChartKey() {
  const items: { shape: React.ReactNode; text: string }[] = [
    { shape: <path d="M1 11 L6 6 L10 9 L15 3" className="stroke-accent" strokeWidth="1.8" fill="none" />, text: "Index value, one point per window (5-min windows every minute; MSE and α2: 60-min windows)" },
    { shape: <circle cx="8" cy="8" r="3.5" className="fill-panel stroke-muted" strokeWidth="1.5" />, text: "Hollow point: limited signal quality, read with care" },
    { shape: <path d="M1 13 H15" className="stroke-muted" strokeWidth="2.5" strokeDasharray="2 3" fill="none" />, text: "Dotted bottom line and a gap: unusable signal, no value shown" },
    {
      shape: (
        <>
          <rect x="0" y="4" width="16" height="8" className="fill-fine" opacity="0.25" />
          <path d="M0 8 H16" className="stroke-fine" strokeWidth="1.2" strokeDasharray="3 2" />
        </>
      ),
      text: "Own baseline: the patient's median (dashed) ± spread (band)",
    },
    {
      shape: (
        <>
          <rect x="1" y="1" width="14" height="14" fill="none" className="stroke-caution" strokeWidth="1.2" strokeDasharray="3 2" />
          <path d="M1 15 L15 1 M1 8 L8 1 M8 15 L15 8" className="stroke-caution" strokeWidth="1" />
        </>
      ),
      text: "Flag, watch: single hatch, dashed outline, tagged “watch”",
    },
    {
      shape: (
        <>
          <rect x="1" y="1" width="14" height="14" fill="none" className="stroke-caution" strokeWidth="2" />
          <path d="M1 15 L15 1 M1 8 L8 1 M8 15 L15 8 M1 1 L15 15 M1 8 L8 15 M8 1 L15 8" className="stroke-caution" strokeWidth="1" />
        </>
      ),
      text: "Flag, review: cross-hatch, solid outline, tagged “review”",
    },
    {
      shape: (
        <>
          <path d="M8 3 V15" className="stroke-ink" strokeWidth="1.3" strokeDasharray="3 2" />
          <path d="M4 1 H12 L8 6 Z" className="fill-ink" />
        </>
      ),
      text: "Clinical event, with its kind written beside the marker",
    },
  ];
  return (
    <details className="text-sm" open>
      <summary className="cursor-pointer font-bold">How to read the charts</summary>
      <ul className="mt-2 grid gap-x-6 gap-y-1 md:grid-cols-2">
        {items.map((it) => (
          <li key={it.text} className="flex items-center gap-2">
            <svg aria-hidden="true" viewBox="0 0 16 16" className="h-4 w-4 shrink-0">{it.shape}</svg>
            {it.text}
          </li>
        ))}
      </ul>
    </details>
  );
}
