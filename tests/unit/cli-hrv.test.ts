// The command-line tool, run as a person would: npm run hrv -- FILE … (here through tsx directly).
import { execFile } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";
import { WHOLE_KEYS } from "@/lib/engine/summary";

const run = promisify(execFile);
const dir = mkdtempSync(join(tmpdir(), "corvane-hrv-"));
const file = (name: string, text: string) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};

async function hrv(...args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run("node_modules/.bin/tsx", ["scripts/hrv.ts", ...args], { cwd: process.cwd() });
    return { code: 0, stdout, stderr };
  } catch (err) {
    const e = err as { code: number; stdout: string; stderr: string };
    return { code: e.code, stdout: e.stdout, stderr: e.stderr };
  }
}

const TOL = 1e-6; // DOMAIN W1 prints 7–9 significant digits

describe("npm run hrv", () => {
  it("answers --json with exactly the documented keys; W1 values as published (DOMAIN §3.2 W1)", async () => {
    const { code, stdout } = await hrv(file("w1.txt", "800\n810\n790\n820\n780\n"), "--no-clean", "--json");
    expect(code).toBe(0);
    const out = JSON.parse(stdout) as { whole: Record<string, unknown>; windows: unknown[] };
    expect(Object.keys(out)).toEqual(["whole", "windows"]);
    expect(Object.keys(out.whole).sort()).toEqual([...WHOLE_KEYS, "reasons", "quality"].sort());
    const w = out.whole as Record<string, number | null> & { reasons: Record<string, string> };
    expect(w.mean_nn).toBeCloseTo(800, 9);
    expect(w.hr).toBeCloseTo(75, 9);
    expect(Math.abs(w.sdnn! - 15.8113883)).toBeLessThan(TOL);
    expect(Math.abs(w.rmssd! - 27.3861279)).toBeLessThan(TOL);
    expect(Math.abs(w.sdsd! - 31.0912635)).toBeLessThan(TOL);
    expect(w.nn50).toBe(0);
    expect(Math.abs(w.sd1! - 21.9848433)).toBeLessThan(TOL);
    expect(Math.abs(w.sd2! - 4.0824829)).toBeLessThan(TOL);
    // Five beats are far too few for entropy or DFA: null, with the reason said.
    expect(w.sampen).toBeNull();
    expect(w.reasons.sampen).toBeTruthy();
    expect(w.dfa_alpha1).toBeNull();
    expect(w.reasons.dfa_alpha1).toMatch(/beats/);
    expect(out.windows).toEqual([]);
  });

  it("reads CSV with time_s and reports windows", async () => {
    const rows = ["time_s,rr_ms"];
    let t = 0;
    for (let i = 0; i < 900; i++) {
      const rr = 1000 + 40 * Math.sin(i / 3) + 25 * Math.sin(i * 1.7);
      t += rr / 1000;
      rows.push(`${t.toFixed(3)},${rr.toFixed(1)}`);
    }
    const { code, stdout } = await hrv(file("night.csv", rows.join("\n")), "--window", "300", "--stride", "150", "--json");
    expect(code).toBe(0);
    const out = JSON.parse(stdout) as { windows: { start_s: number; end_s: number; sdnn: number | null; quality: { grade: string } }[] };
    // The series starts at t = 0 (time of the first beat minus its interval); complete windows only.
    expect(out.windows.length).toBe(Math.floor((t - 300) / 150) + 1);
    expect(out.windows[1]!.start_s - out.windows[0]!.start_s).toBeCloseTo(150, 6);
    expect(out.windows[0]!.sdnn).toBeGreaterThan(0);
  });

  it.each([
    ["letters.txt", "800\n810\nabc\n", /letters\.txt:3: "abc" is not a number/],
    ["negative.txt", "800\n-810\n", /negative\.txt:2: interval -810 ms is not positive/],
    ["absurd.txt", "800\n81000\n", /absurd\.txt:2: interval 81000 ms is longer than 10000 ms/],
    ["empty.txt", "# nothing\n", /empty\.txt: the file holds no intervals/],
  ])("refuses bad input %s with the line and the reason", async (name, text, message) => {
    const { code, stderr, stdout } = await hrv(file(name, text), "--json");
    expect(code).not.toBe(0);
    expect(stderr).toMatch(message);
    expect(stdout).toBe("");
  });

  it("refuses an unknown option and a missing file with usage help", async () => {
    const unknown = await hrv(file("ok.txt", "800\n"), "--bogus");
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toMatch(/Unknown option '--bogus'/);
    expect(unknown.stderr).toMatch(/usage: npm run hrv/);
    const missing = await hrv(join(dir, "no-such-file.txt"));
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/cannot read .*no-such-file\.txt: ENOENT/);
    const badR = await hrv(file("ok2.txt", "800\n"), "--r", "zero");
    expect(badR.code).toBe(2);
    expect(badR.stderr).toMatch(/--r needs a positive number/);
  });
});
