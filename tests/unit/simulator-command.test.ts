import { execFileSync } from "node:child_process";
import { parseArgs } from "node:util";
import { describe, expect, it } from "vitest";
import { simulatorCommand } from "@/lib/devices/simulator-command";
import { DEFAULT_SIMULATOR_PORT } from "@/seeds/demo-data";

/** The words a real POSIX shell (/bin/sh, the outside source for quoting rules) splits the command's arguments into. */
function shellWords(command: string): string[] {
  const args = command.replace(/^npm run simulator -- /, "");
  const out = execFileSync("sh", ["-c", `printf '%s\\0' ${args}`], { encoding: "utf8" });
  return out.split("\0").slice(0, -1);
}

/** How scripts/simulator.ts reads them (node:util parseArgs, strict), so the command really runs. */
function simulatorOptions(words: string[]) {
  return parseArgs({
    args: words,
    strict: true,
    options: { device: { type: "string" }, token: { type: "string" }, port: { type: "string" } },
  }).values;
}

const device = { serial: "LVG-NEW-01", streamUrl: "http://127.0.0.1:4101/devices/LVG-NEW-01/stream" };

describe("simulator command", () => {
  it("names the device, the token and the port of its stream address", () => {
    expect(simulatorCommand(device, "abcDEF_123")).toBe("npm run simulator -- --device LVG-NEW-01 --token 'abcDEF_123' --port 4101");
  });

  it("shows a placeholder when the token is not at hand", () => {
    expect(simulatorCommand(device, null)).toBe("npm run simulator -- --device LVG-NEW-01 --token '<token>' --port 4101");
  });

  it("accepts localhost and the default http port", () => {
    expect(simulatorCommand({ serial: "A1", streamUrl: "http://localhost:3201/devices/A1/stream" }, "t")).toContain("--port 3201");
    expect(simulatorCommand({ serial: "A1", streamUrl: "http://127.0.0.1/devices/A1/stream" }, "t")).toContain("--port 80");
  });

  it.each([
    ["https", "https://127.0.0.1:4101/devices/LVG-NEW-01/stream"],
    ["another host", "http://10.0.0.5:4101/devices/LVG-NEW-01/stream"],
    ["another serial in the path", "http://127.0.0.1:4101/devices/LVG-OTHER/stream"],
    ["another path", "http://127.0.0.1:4101/devices/LVG-NEW-01/beats"],
    ["a query string", "http://127.0.0.1:4101/devices/LVG-NEW-01/stream?x=1"],
    ["credentials", "http://u:p@127.0.0.1:4101/devices/LVG-NEW-01/stream"],
    ["not a URL", "127.0.0.1:4101/devices/LVG-NEW-01/stream"],
    ["the port of npm start's demo simulator, which serves it already", `http://127.0.0.1:${DEFAULT_SIMULATOR_PORT}/devices/LVG-NEW-01/stream`],
  ])("gives no command for %s (the simulator cannot serve it)", (_label, streamUrl) => {
    expect(simulatorCommand({ serial: "LVG-NEW-01", streamUrl }, "tok")).toBeNull();
  });

  it.each([
    ["base64url", "q0-Xr_9Zk2mN8pLw4sT7vB1cD5eF6gH3iJ0kLmNoPqR"],
    ["starting with a dash", "-q0Xr_9Zk2mN8pLw4sT7vB1cD5eF6gH3iJ0kLmNoPqR"],
    ["shell metacharacters", `a'b"c$(rm -rf x);\`d\` e*f\\g`],
  ])("round-trips a token %s through a POSIX shell into the simulator's options", (_label, token) => {
    const command = simulatorCommand(device, token)!;
    expect(simulatorOptions(shellWords(command))).toEqual({ device: "LVG-NEW-01", token, port: "4101" });
  });
});
