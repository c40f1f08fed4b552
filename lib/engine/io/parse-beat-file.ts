// Reads a beat-interval file: one RR interval in ms per line, or CSV with a header naming an `rr_ms` column and an
// optional `time_s` column (beat time in seconds). `#` starts a comment; blank lines are skipped. Used by the
// command-line tool and, later, by recording import. Pure: text in, arrays out.

/** Longest interval accepted from a file, ms. Anything longer is not a beat interval (a gap, a unit error). */
export const MAX_FILE_RR_MS = 10_000;

export type ParsedBeatFile =
  | {
      ok: true;
      /** RR intervals, ms. */
      rr: Float64Array;
      /** Beat times, s: from `time_s` when given, else the running sum of the intervals. */
      times: Float64Array;
      timesGiven: boolean;
      format: "plain" | "csv";
    }
  | { ok: false; line: number | null; message: string };

const fail = (line: number | null, message: string): ParsedBeatFile => ({ ok: false, line, message });

function splitCsv(line: string): string[] {
  return line.split(/[,;\t]/).map((c) => c.trim());
}

function parseNumber(cell: string): number | null {
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(cell)) return null;
  return Number(cell);
}

export function parseBeatFile(text: string): ParsedBeatFile {
  const lines = text.split(/\r?\n/);
  const rr: number[] = [];
  const times: number[] = [];
  let format: "plain" | "csv" | null = null;
  let rrCol = 0;
  let timeCol = -1;
  let columns = 1;

  for (let i = 0; i < lines.length; i++) {
    const lineNo = i + 1;
    const content = lines[i]!.replace(/#.*$/, "").trim();
    if (!content) continue;
    const cells = splitCsv(content);

    if (format === null) {
      // The first data line decides: a header (any non-numeric cell) means CSV; a lone number means plain.
      if (cells.some((c) => parseNumber(c) === null)) {
        const names = cells.map((c) => c.toLowerCase().replace(/^"|"$/g, ""));
        rrCol = names.indexOf("rr_ms");
        timeCol = names.indexOf("time_s");
        if (rrCol < 0) {
          return fail(lineNo, cells.length > 1
            ? `the header has no "rr_ms" column (found: ${names.join(", ")})`
            : `"${cells[0]}" is not a number, and the file has no CSV header naming an "rr_ms" column`);
        }
        format = "csv";
        columns = cells.length;
        continue;
      }
      format = cells.length > 1 ? "csv" : "plain";
      if (format === "csv") return fail(lineNo, "several values on a line but no header naming an \"rr_ms\" column");
    }

    if (format === "plain" && cells.length > 1) return fail(lineNo, "expected one interval per line");
    if (format === "csv" && cells.length !== columns) {
      return fail(lineNo, `expected ${columns} columns as in the header, found ${cells.length}`);
    }
    const value = parseNumber(cells[rrCol]!);
    if (value === null) return fail(lineNo, `"${cells[rrCol]}" is not a number`);
    if (value <= 0) return fail(lineNo, `interval ${value} ms is not positive`);
    if (value > MAX_FILE_RR_MS) return fail(lineNo, `interval ${value} ms is longer than ${MAX_FILE_RR_MS} ms: not a beat interval (is the unit seconds?)`);
    rr.push(value);
    if (timeCol >= 0) {
      const t = parseNumber(cells[timeCol]!);
      if (t === null) return fail(lineNo, `time "${cells[timeCol]}" is not a number`);
      if (times.length && t <= times[times.length - 1]!) return fail(lineNo, `time ${t} s does not come after the previous beat`);
      times.push(t);
    }
  }

  if (rr.length === 0) return fail(null, "the file holds no intervals");
  const rrArr = Float64Array.from(rr);
  let t: Float64Array;
  if (timeCol >= 0) t = Float64Array.from(times);
  else {
    t = new Float64Array(rr.length);
    let acc = 0;
    for (let i = 0; i < rr.length; i++) t[i] = acc += rr[i]! / 1000;
  }
  return { ok: true, rr: rrArr, times: t, timesGiven: timeCol >= 0, format: format ?? "plain" };
}
