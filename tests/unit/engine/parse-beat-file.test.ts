import { describe, expect, it } from "vitest";
import { parseBeatFile } from "@/lib/engine/io/parse-beat-file";

describe("beat-interval files", () => {
  it("reads one interval per line with comments and blank lines", () => {
    const r = parseBeatFile("# night of a fictional patient\n800\n\n810.5  # a comment\n790\n");
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(Array.from(r.rr)).toEqual([800, 810.5, 790]);
    expect(Array.from(r.times)).toEqual([0.8, 1.6105, 2.4005]);
    expect(r).toMatchObject({ timesGiven: false, format: "plain" });
  });

  it("reads CSV with rr_ms and optional time_s in any column order", () => {
    const r = parseBeatFile("time_s,quality,rr_ms\n1.0,0.9,1000\n1.8,1,800\n");
    expect(r.ok && Array.from(r.rr)).toEqual([1000, 800]);
    expect(r.ok && Array.from(r.times)).toEqual([1.0, 1.8]);
    expect(parseBeatFile("RR_MS\n900\n").ok).toBe(true);
  });

  it.each([
    ["800\nabc\n", 2, "is not a number"],
    ["800\n-5\n", 2, "not positive"],
    ["800\n0\n", 2, "not positive"],
    ["0.8\n20000\n", 2, "longer than"],
    ["time_s,value\n1,800\n", 1, 'no "rr_ms" column'],
    ["rr_ms,time_s\n800,1\n810\n", 3, "expected 2 columns"],
    ["rr_ms,time_s\n800,2\n810,1\n", 3, "does not come after"],
    ["800,810\n", 1, "no header"],
  ])("names the line and the reason for bad input %#", (text, line, message) => {
    const r = parseBeatFile(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.line).toBe(line);
    expect(r.message).toContain(message);
  });

  it("refuses an empty file", () => {
    expect(parseBeatFile("# only a comment\n\n")).toEqual({ ok: false, line: null, message: "the file holds no intervals" });
  });
});
