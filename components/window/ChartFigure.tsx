// The frame every Window detail chart sits in: a heading, a one-line text summary (the chart's text alternative), a
// legend in words and shapes, the chart, and its data as a table behind a disclosure (WCAG 1.1.1).
export function ChartFigure({
  id,
  title,
  summary,
  legend,
  tableLabel,
  table,
  children,
}: {
  id: string;
  title: string;
  summary: React.ReactNode;
  legend?: React.ReactNode;
  tableLabel: string;
  table: React.ReactNode;
  children: React.ReactNode;
}) {
  return (
    <figure aria-labelledby={`${id}-title`} className="card space-y-3 p-4">
      <h3 id={`${id}-title`} className="text-base font-bold">{title}</h3>
      <figcaption className="text-sm text-muted">{summary}</figcaption>
      {legend && <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm" aria-label={`Legend: ${title}`}>{legend}</ul>}
      {children}
      <details className="text-sm">
        <summary className="cursor-pointer text-accent">{tableLabel}</summary>
        <div className="mt-2 max-h-80 overflow-auto">{table}</div>
      </details>
    </figure>
  );
}

/** A message in place of a chart that cannot be drawn, with the reason in words. */
export function ChartUnavailable({ title, reason }: { title: string; reason: string }) {
  return (
    <section className="card space-y-1 p-4" aria-label={title}>
      <h3 className="text-base font-bold">{title}</h3>
      <p className="text-sm text-muted">
        <span aria-hidden="true">— </span>Not shown: {reason}.
      </p>
    </section>
  );
}
