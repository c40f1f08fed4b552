// Legend marks that match the shapes the charts draw (chart-kit.ts), so a legend entry names its shape in a word and
// shows it too; colour is never the only difference.
import type { Shape } from "./chart-kit";

export function ShapeIcon({ shape, className = "" }: { shape: Shape | "line" | "dashed" | "band"; className?: string }) {
  const common = { fill: "currentColor", stroke: "currentColor", strokeWidth: 1.5 };
  return (
    <svg aria-hidden="true" viewBox="0 0 16 16" className={`inline-block h-4 w-4 shrink-0 align-[-2px] ${className}`}>
      {shape === "circle" && <circle cx="8" cy="8" r="3.5" {...common} />}
      {shape === "triangle" && <path d="M8 3.2l4.4 8H3.6z" {...common} />}
      {shape === "square" && <rect x="4.4" y="4.4" width="7.2" height="7.2" {...common} />}
      {shape === "diamond" && <path d="M8 3.2l4.8 4.8L8 12.8 3.2 8z" {...common} />}
      {shape === "cross" && <path d="M4.5 4.5l7 7m0-7l-7 7" fill="none" stroke="currentColor" strokeWidth="2" />}
      {shape === "line" && <path d="M1 8h14" fill="none" stroke="currentColor" strokeWidth="2.5" />}
      {shape === "dashed" && <path d="M1 8h14" fill="none" stroke="currentColor" strokeWidth="2.5" strokeDasharray="3 2" />}
      {shape === "band" && <rect x="1.5" y="2.5" width="13" height="11" fill="currentColor" fillOpacity="0.3" stroke="currentColor" strokeWidth="1" />}
    </svg>
  );
}

export function LegendItem({ shape, className, children }: { shape: Parameters<typeof ShapeIcon>[0]["shape"]; className?: string; children: React.ReactNode }) {
  return (
    <li className="flex items-center gap-1.5">
      <ShapeIcon shape={shape} className={className} />
      <span>{children}</span>
    </li>
  );
}
