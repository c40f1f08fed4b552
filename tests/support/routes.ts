// Discovers pages, route handlers and server actions from the file system, so routes added later are covered by
// the role × route matrix test without anyone remembering to list them.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, sep } from "node:path";

const ROOT = process.cwd();

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name);
    if (name === "node_modules" || name.startsWith(".")) return [];
    return statSync(full).isDirectory() ? walk(full) : [full];
  });
}

/** App Router path of a page.tsx or route.ts: route groups "(x)" removed, "[param]" kept. */
export function routePath(file: string): string {
  const parts = relative(join(ROOT, "app"), file).split(sep).slice(0, -1).filter((p) => !/^\(.*\)$/.test(p));
  return `/${parts.join("/")}`;
}

export function discoverRoutes(): { pages: string[]; handlers: string[] } {
  const files = walk(join(ROOT, "app"));
  return {
    pages: files.filter((f) => /[/\\]page\.tsx?$/.test(f)).map(routePath).sort(),
    handlers: files.filter((f) => /[/\\]route\.ts$/.test(f)).map(routePath).sort(),
  };
}

/** Exported names of every module that starts with "use server". */
export function discoverServerActions(): { file: string; name: string }[] {
  const files = ["app", "lib", "components"].flatMap((d) => walk(join(ROOT, d))).filter((f) => /\.tsx?$/.test(f));
  const out: { file: string; name: string }[] = [];
  for (const file of files) {
    const text = readFileSync(file, "utf8");
    if (!/^\s*(\/\/[^\n]*\n\s*)*["']use server["']/.test(text)) continue;
    for (const m of text.matchAll(/^export\s+(?:const|async\s+function|function)\s+([A-Za-z0-9_]+)/gm)) {
      out.push({ file: relative(ROOT, file), name: m[1]! });
    }
  }
  return out.sort((a, b) => a.name.localeCompare(b.name));
}

/** Server action ids from the production build, by exported name, with a page that hosts each. */
export function builtServerActions(): Map<string, { id: string; page: string }> {
  const manifest = JSON.parse(readFileSync(join(ROOT, process.env.CORVANE_DIST_DIR ?? ".next", "server/server-reference-manifest.json"), "utf8")) as {
    node: Record<string, { workers: Record<string, unknown>; exportedName?: string }>;
  };
  const out = new Map<string, { id: string; page: string }>();
  for (const [id, entry] of Object.entries(manifest.node)) {
    const worker = Object.keys(entry.workers)[0]!; // e.g. "app/(signed-in)/people/new/page"
    const page = `/${worker.split("/").slice(1, -1).filter((p) => !/^\(.*\)$/.test(p)).join("/")}`;
    if (entry.exportedName) out.set(entry.exportedName, { id, page });
  }
  return out;
}
