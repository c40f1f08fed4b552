// Reads a fixture written by a script in tests/reference/ (re-run by npm test before Vitest).
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";

export interface Fixture<C = unknown> {
  /** The outside source: library and function, or paper. */
  source: string;
  /** The script that wrote it. */
  generated_by: string;
  /** Versions of the tools that produced it. */
  tool_versions: Record<string, string>;
  cases: C[];
}

export function loadFixture<C>(name: string): Fixture<C> {
  const path = fileURLToPath(new URL(`../reference/fixtures/${name}.json`, import.meta.url));
  return JSON.parse(readFileSync(path, "utf8")) as Fixture<C>;
}
