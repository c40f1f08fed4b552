// A message with an icon and a word, so its meaning never rests on colour alone.
type Tone = "problem" | "fine" | "info";

const STYLES: Record<Tone, { box: string; word: string; path: string }> = {
  problem: { box: "border-problem bg-problem-surface", word: "Problem", path: "M10 5v6m0 3.5v.5" },
  fine: { box: "border-fine bg-fine-surface", word: "Done", path: "M5.5 10.5l3 3 6-7" },
  info: { box: "border-line bg-panel", word: "Note", path: "M10 9v5m0-8v.5" },
};

export function Notice({ tone, children, id }: { tone: Tone; children: React.ReactNode; id?: string }) {
  const s = STYLES[tone];
  return (
    <div id={id} role={tone === "problem" ? "alert" : "status"} className={`flex items-start gap-3 rounded-md border px-4 py-3 ${s.box}`}>
      <svg aria-hidden="true" viewBox="0 0 20 20" className="mt-0.5 h-5 w-5 shrink-0">
        <circle cx="10" cy="10" r="8.5" fill="none" stroke="currentColor" strokeWidth="1.8" />
        <path d={s.path} fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
      </svg>
      <div>
        <span className="sr-only">{s.word}: </span>
        {children}
      </div>
    </div>
  );
}
