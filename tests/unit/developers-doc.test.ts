// DEVELOPERS.md stays true: every file it links to or names in code, every npm script and test file it tells a reader
// to run, and every exported name it lists under "Names this guide relies on" must exist in the repository. The
// checker is also run on an inline sample with known faults, so a checker that finds nothing cannot pass unnoticed.
import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const ROOT = fileURLToPath(new URL("../..", import.meta.url));

/** Endings that make a backticked word a file name even without a slash (a bare `hrv.ts` must be written in full). */
const KNOWN_EXTENSIONS = ["ts", "tsx", "js", "mjs", "cjs", "json", "md", "sh", "R", "py", "m", "css", "sql", "yml", "yaml", "csv", "png", "pdf"];
/** npm's own commands a guide may name besides package.json's scripts. */
const NPM_BUILT_INS = ["start", "test", "install", "ci"];
/** Vitest options that take a value: the word after them is not a path. */
const VITEST_VALUE_OPTIONS = ["--project", "-t", "--testNamePattern", "--reporter", "--config", "--outputFile"];
const EXPORTS_START = "<!-- checked-exports:start -->";
const EXPORTS_END = "<!-- checked-exports:end -->";

interface Repo {
  exists(rel: string): boolean;
  /** Some file or folder matches the pattern (`<name>` is one path segment, `*` part of one). */
  matches(pattern: string): boolean;
  read(rel: string): string | null;
  ignored(rel: string): boolean;
  scripts: Set<string>;
}

interface Report {
  problems: string[];
  counts: { links: number; paths: number; npm: number; vitest: number; exports: number };
}

const escapeRegex = (s: string) => s.replace(/[.+?^${}()|[\]\\]/g, "\\$&");

/** gitignore lines without a slash in the middle match a path segment at any depth (enough for this repository's). */
function gitignoreMatcher(text: string): (rel: string) => boolean {
  const patterns = text
    .split("\n")
    .map((l) => l.trim())
    .filter((l) => l && !l.startsWith("#") && !l.startsWith("!"))
    .map((l) => l.replace(/^\//, "").replace(/\/$/, ""))
    .filter((l) => !l.includes("/"))
    .map((l) => new RegExp(`^${l.split("*").map(escapeRegex).join("[^/]*")}$`));
  return (rel) => rel.split("/").some((seg) => patterns.some((p) => p.test(seg)));
}

function realRepo(root: string): Repo {
  const ignored = gitignoreMatcher(existsSync(join(root, ".gitignore")) ? readFileSync(join(root, ".gitignore"), "utf8") : "");
  let entries: string[] | null = null;
  const walk = (dir: string, prefix: string, out: string[]) => {
    for (const name of readdirSync(dir)) {
      if (name === ".git" || name === "node_modules") continue;
      const rel = prefix ? `${prefix}/${name}` : name;
      if (ignored(rel)) continue;
      out.push(rel);
      if (statSync(join(dir, name)).isDirectory()) walk(join(dir, name), rel, out);
    }
    return out;
  };
  const pkg = JSON.parse(readFileSync(join(root, "package.json"), "utf8")) as { scripts?: Record<string, string> };
  return {
    exists: (rel) => existsSync(join(root, rel)),
    matches: (pattern) => {
      entries ??= walk(root, "", []);
      const re = new RegExp(`^${pattern.replace(/\/$/, "").split(/(<[^>]+>|\*)/).map((p) => (p === "*" ? "[^/]*" : p.startsWith("<") ? "[^/]+" : escapeRegex(p))).join("")}$`);
      return entries.some((e) => re.test(e));
    },
    read: (rel) => (existsSync(join(root, rel)) && statSync(join(root, rel)).isFile() ? readFileSync(join(root, rel), "utf8") : null),
    ignored,
    scripts: new Set(Object.keys(pkg.scripts ?? {})),
  };
}

/** GitHub's heading anchors: lower case, punctuation dropped, spaces to hyphens, repeats numbered. */
function headingAnchors(md: string): Set<string> {
  const seen = new Map<string, number>();
  const out = new Set<string>();
  let fenced = false;
  for (const line of md.split("\n")) {
    if (/^\s*```/.test(line)) fenced = !fenced;
    const h = !fenced && /^#{1,6}\s+(.*)$/.exec(line);
    if (!h) continue;
    const base = h[1]!.trim().toLowerCase().replace(/`/g, "").replace(/[^\p{L}\p{N}\s_-]/gu, "").replace(/\s/g, "-");
    const n = seen.get(base) ?? 0;
    seen.set(base, n + 1);
    out.add(n ? `${base}-${n}` : base);
  }
  return out;
}

/** Fenced blocks and inline code spans, each with its line number; `prose` is the text outside fences. */
function codeOf(md: string): { code: { text: string; line: number }[]; prose: { text: string; line: number }[] } {
  const code: { text: string; line: number }[] = [];
  const prose: { text: string; line: number }[] = [];
  let fenced = false;
  md.split("\n").forEach((line, i) => {
    if (/^\s*```/.test(line)) {
      fenced = !fenced;
      return;
    }
    if (fenced) code.push({ text: line, line: i + 1 });
    else {
      prose.push({ text: line, line: i + 1 });
      for (const m of line.matchAll(/`([^`]+)`/g)) code.push({ text: m[1]!, line: i + 1 });
    }
  });
  return { code, prose };
}

/** Words of a code span or command line that name a file or folder of this repository. */
function pathWords(text: string): string[] {
  return text
    .split(/\s+/)
    .map((w) => w.replace(/^["'(]+|["'),;:]+$/g, ""))
    .filter((w) => w.length > 1)
    .filter((w) => !/^[/~@-]/.test(w))
    .filter((w) => !/:\/\/|[=$…]/.test(w))
    .filter((w) => /^[\w.\-()[\]<>*/]+$/.test(w))
    .filter((w) => w.includes("/") || KNOWN_EXTENSIONS.some((e) => w.endsWith(`.${e}`)));
}

function exportsName(source: string, name: string): boolean {
  const n = escapeRegex(name);
  const declared = new RegExp(`^export\\s+(?:default\\s+)?(?:declare\\s+)?(?:abstract\\s+)?(?:async\\s+)?(?:function\\*?|const|let|var|class|interface|type|enum)\\s+${n}\\b`, "m");
  if (declared.test(source)) return true;
  for (const m of source.matchAll(/^export\s+(?:type\s+)?\{([^}]*)\}/gm)) {
    const names = m[1]!.split(",").map((s) => s.trim().split(/\s+as\s+/).pop()!.replace(/^type\s+/, ""));
    if (names.includes(name)) return true;
  }
  return false;
}

function checkDoc(md: string, repo: Repo, docName = "DEVELOPERS.md"): Report {
  const problems: string[] = [];
  const counts = { links: 0, paths: 0, npm: 0, vitest: 0, exports: 0 };
  const at = (line: number) => `${docName}:${line}`;
  const { code, prose } = codeOf(md);
  const anchorsOf = new Map<string, Set<string>>([["", headingAnchors(md)]]);

  // (a) relative links, with their #anchors
  for (const { text, line } of prose) {
    for (const m of text.replace(/`[^`]*`/g, "").matchAll(/\[[^\]]*\]\(([^)\s]+)\)/g)) {
      const target = m[1]!;
      if (/^[a-z]+:/i.test(target)) continue;
      counts.links += 1;
      const [file, anchor] = target.split("#") as [string, string | undefined];
      if (file && !repo.exists(file)) {
        problems.push(`${at(line)}: link target "${file}" does not exist`);
        continue;
      }
      if (anchor !== undefined && (!file || file.endsWith(".md"))) {
        if (!anchorsOf.has(file)) anchorsOf.set(file, headingAnchors(repo.read(file) ?? ""));
        if (!anchorsOf.get(file)!.has(anchor)) problems.push(`${at(line)}: link "${target}" names no heading of ${file || docName}`);
      }
    }
  }

  for (const { text, line } of code) {
    // (a) backticked paths and paths in command lines
    for (const w of pathWords(text)) {
      if (repo.ignored(w)) continue;
      counts.paths += 1;
      const found = /[<*]/.test(w) ? repo.matches(w) : repo.exists(w);
      if (!found) problems.push(`${at(line)}: path "${w}" does not exist in the repository`);
    }
    // (b) npm commands
    // "npm run <script>" with a placeholder is prose about commands, not a command.
    for (const m of text.matchAll(/\bnpm\s+(?:run\s+([A-Za-z][\w:.-]*)|(?!run\b)([A-Za-z][\w:.-]*))/g)) {
      counts.npm += 1;
      const name = m[1] ?? m[2]!;
      const ok = repo.scripts.has(name) || (m[2] !== undefined && NPM_BUILT_INS.includes(name));
      if (!ok) problems.push(`${at(line)}: "npm ${m[1] ? "run " : ""}${name}" names no script in package.json`);
    }
    // (c) npx vitest run <path …>
    for (const m of text.matchAll(/\bnpx\s+vitest\s+run\b([^;&|`]*)/g)) {
      counts.vitest += 1;
      const words = m[1]!.trim().split(/\s+/).filter(Boolean);
      for (let i = 0; i < words.length; i++) {
        const w = words[i]!;
        if (w === "\\") continue;
        if (w.startsWith("-")) {
          if (VITEST_VALUE_OPTIONS.includes(w)) i += 1;
          continue;
        }
        const found = /[<*]/.test(w) ? repo.matches(w) : repo.exists(w);
        if (!found) problems.push(`${at(line)}: "npx vitest run ${w}": no such test file`);
      }
    }
  }

  // (d) names the guide relies on: "- `a`, `b` in `path`" between the markers
  const start = md.indexOf(EXPORTS_START);
  const end = md.indexOf(EXPORTS_END);
  if (start < 0 || end < start) problems.push(`${docName}: the list between ${EXPORTS_START} and ${EXPORTS_END} is missing`);
  else {
    const firstLine = md.slice(0, start).split("\n").length;
    md.slice(start, end).split("\n").forEach((text, i) => {
      const m = /^\s*[-*]\s+(.+?)\s+in\s+`([^`]+)`/.exec(text);
      if (!m) return;
      const source = repo.read(m[2]!);
      for (const n of m[1]!.matchAll(/`([A-Za-z_$][\w$]*)`/g)) {
        counts.exports += 1;
        if (source === null) problems.push(`${at(firstLine + i)}: ${m[2]} does not exist (for ${n[1]})`);
        else if (!exportsName(source, n[1]!)) problems.push(`${at(firstLine + i)}: ${m[2]} does not export ${n[1]}`);
      }
    });
  }
  return { problems, counts };
}

describe("DEVELOPERS.md", () => {
  const repo = realRepo(ROOT);
  const doc = readFileSync(join(ROOT, "DEVELOPERS.md"), "utf8");
  const report = checkDoc(doc, repo);

  it("names only files, npm scripts, test files and exports that exist", () => {
    expect(report.problems).toEqual([]);
  });

  it("still has something to check: links, paths, commands and the list of names", () => {
    // Floors well below today's counts; they catch a checker (or a guide) that stopped seeing anything.
    expect(report.counts.links).toBeGreaterThanOrEqual(5);
    expect(report.counts.paths).toBeGreaterThanOrEqual(40);
    expect(report.counts.npm).toBeGreaterThanOrEqual(5);
    expect(report.counts.vitest).toBeGreaterThanOrEqual(3);
    expect(report.counts.exports).toBeGreaterThanOrEqual(20);
  });

  it("reports a bad path added to a copy of the guide, and only that", () => {
    const broken = checkDoc(`${doc}\nSee \`lib/engine/no-such-method.ts\`.\n`, repo);
    expect(broken.problems).toHaveLength(1);
    expect(broken.problems[0]).toMatch(/path "lib\/engine\/no-such-method\.ts" does not exist/);
  });
});

describe("the DEVELOPERS.md checker, on an inline sample", () => {
  const repo = realRepo(ROOT);
  const sample = [
    "# Sample",
    "## Part two",
    "Good: [engine](lib/engine/README.md), [here](#part-two), [readme](README.md#the-numeric-engine), `lib/engine/version.ts`,",
    "`lib/engine/<area>/`, `.pgdata/main/` (git-ignored, skipped), `/api/health` (a URL, skipped).",
    "Bad: [gone](lib/gone.md), [nowhere](#no-such-heading), `lib/engine/nope.ts`, `hrv.ts`, `lib/<x>/missing-*.ts`.",
    "```sh",
    "npm run bench:engine && npm test && npm ci",
    "npm run no-such-script",
    "npm frobnicate",
    "npx vitest run tests/unit/flags.test.ts --project unit",
    "npx vitest run tests/unit/missing.test.ts",
    "```",
    EXPORTS_START,
    "- `ALGORITHM_VERSION` in `lib/engine/version.ts`",
    "- `guardedAction`, `noSuchGuard` in `lib/auth/guard.ts`",
    "- `anything` in `lib/not-here.ts`",
    EXPORTS_END,
  ].join("\n");
  const { problems, counts } = checkDoc(sample, repo, "sample.md");

  it("finds every planted fault, each once", () => {
    const expected = [
      /sample\.md:5: link target "lib\/gone\.md" does not exist/,
      /sample\.md:5: link "#no-such-heading" names no heading/,
      /sample\.md:5: path "lib\/engine\/nope\.ts" does not exist/,
      /sample\.md:5: path "hrv\.ts" does not exist/,
      /sample\.md:5: path "lib\/<x>\/missing-\*\.ts" does not exist/,
      /sample\.md:8: "npm run no-such-script" names no script/,
      /sample\.md:9: "npm frobnicate" names no script/,
      /sample\.md:11: path "tests\/unit\/missing\.test\.ts" does not exist/,
      /sample\.md:11: "npx vitest run tests\/unit\/missing\.test\.ts": no such test file/,
      /sample\.md:15: lib\/auth\/guard\.ts does not export noSuchGuard/,
      /sample\.md:16: path "lib\/not-here\.ts" does not exist/,
      /sample\.md:16: lib\/not-here\.ts does not exist \(for anything\)/,
    ];
    for (const re of expected) expect(problems.filter((p) => re.test(p)), String(re)).toHaveLength(1);
    expect(problems.filter((p) => !expected.some((re) => re.test(p))), "unexpected problems").toEqual([]);
  });

  it("accepts the good entries and skips ignored folders and URLs", () => {
    const good = ["README.md", "#part-two", "lib/engine/README.md", "version.ts", "<area>", ".pgdata", "/api/health", "bench:engine", "npm test", "npm ci", "flags.test.ts", "ALGORITHM_VERSION", "guardedAction"];
    for (const g of good) expect(problems.filter((p) => p.includes(g)), g).toEqual([]);
    expect(counts).toMatchObject({ links: 5, npm: 5, vitest: 2, exports: 4 });
  });

  it("reads exports declared in every form", () => {
    const src = "export const a = 1;\nexport async function b() {}\nexport interface C {}\nexport { d, e as f };\nexport type { G } from './x';\n";
    for (const name of ["a", "b", "C", "d", "f", "G"]) expect(exportsName(src, name), name).toBe(true);
    for (const name of ["e", "x", "aa"]) expect(exportsName(src, name), name).toBe(false);
  });
});
