import { Writable } from "node:stream";
import { describe, expect, it } from "vitest";
import { createLogger } from "@/lib/log";

function capture() {
  const lines: Record<string, unknown>[] = [];
  const stream = new Writable({
    write(chunk, _enc, done) {
      lines.push(JSON.parse(String(chunk)) as Record<string, unknown>);
      done();
    },
  });
  return { logger: createLogger(stream, "info"), lines };
}

describe("logging", () => {
  it("writes JSON lines with the request id and removes patient and secret fields", () => {
    const { logger, lines } = capture();
    logger.info(
      {
        requestId: "req-1",
        patient: { displayName: "Tillery, Rowan", recordNumber: "DEMO-40117", id: "p-1" },
        display_name: "Tillery, Rowan",
        password: "hunter2-hunter2",
        headers: { cookie: "next-auth.session-token=abc", authorization: "Bearer t" },
      },
      "viewed",
    );
    expect(lines).toHaveLength(1);
    const line = lines[0]!;
    expect(line).toMatchObject({ level: 30, service: "corvane", requestId: "req-1", msg: "viewed", patient: { id: "p-1" } });
    const text = JSON.stringify(line);
    for (const secret of ["Tillery", "DEMO-40117", "hunter2", "session-token", "Bearer"]) expect(text).not.toContain(secret);
  });
});
