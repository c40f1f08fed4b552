// The head of every page: a small line saying which screen this is (or the way back to it), the page's one h1, an
// optional description under it, and an optional aside (a figure or the page's main actions) to the right, wrapping
// under it on narrow screens. One place, so every screen's head reads and wraps the same way.
import type { ReactNode } from "react";

export function PageHeader({
  eyebrow,
  title,
  titleClassName,
  description,
  aside,
}: {
  /** The screen's name, or a link back to the screen this page belongs to. */
  eyebrow?: ReactNode;
  title: ReactNode;
  titleClassName?: string;
  /** Under the title: the page passes its own paragraph(s). */
  description?: ReactNode;
  aside?: ReactNode;
}) {
  return (
    <div className="flex flex-wrap items-end justify-between gap-x-6 gap-y-2">
      <div>
        {eyebrow && <p className="text-sm text-muted">{eyebrow}</p>}
        <h1 className={titleClassName}>{title}</h1>
        {description}
      </div>
      {aside}
    </div>
  );
}
