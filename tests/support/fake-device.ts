// A minimal stand-in device for ingest tests: serves given records over SSE with the real wire format, honours
// Last-Event-ID, can cut the connection after chosen records, and can write raw (hostile) text.
import { createServer, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { formatStreamEvent, type StreamRecord } from "@/lib/streaming/protocol";

export interface FakeDevice {
  url: string;
  token: string;
  /** Records served, in seq order; push more to stream them live. */
  records: StreamRecord[];
  /** After sending the record with one of these seqs, the connection is dropped (each cut happens once). */
  cutAfter: Set<number>;
  connections: number;
  /** Writes raw SSE text to every open connection. */
  inject(raw: string): void;
  /** Sends records appended since the last call to open connections. */
  publish(): void;
  close(): Promise<void>;
}

export async function startFakeDevice(records: StreamRecord[], token = "fake-token"): Promise<FakeDevice> {
  const clients = new Set<{ res: ServerResponse; next: number }>();
  const device: FakeDevice = {
    url: "",
    token,
    records,
    cutAfter: new Set(),
    connections: 0,
    inject(raw) {
      for (const c of clients) c.res.write(raw);
    },
    publish() {
      for (const c of clients) pump(c);
    },
    close: () =>
      new Promise((resolve) => {
        for (const c of clients) c.res.destroy();
        server.close(() => resolve());
      }),
  };
  const pump = (c: { res: ServerResponse; next: number }) => {
    while (c.next < device.records.length) {
      const r = device.records[c.next]!;
      c.next += 1;
      c.res.write(formatStreamEvent(r));
      if (device.cutAfter.delete(r.seq)) {
        // end(), not destroy(): what was written reaches the reader before the connection closes.
        c.res.end();
        clients.delete(c);
        return;
      }
    }
  };
  const server = createServer((req, res) => {
    if (req.headers.authorization !== `Bearer ${token}`) {
      res.writeHead(401, { "content-type": "application/json" }).end('{"error":"unauthorized"}');
      return;
    }
    device.connections += 1;
    const last = Number(req.headers["last-event-id"] ?? 0) || 0;
    res.writeHead(200, { "content-type": "text/event-stream", "cache-control": "no-store" });
    res.write("retry: 20\n\n");
    const c = { res, next: device.records.findIndex((r) => r.seq > last) };
    if (c.next < 0) c.next = device.records.length;
    clients.add(c);
    req.on("close", () => clients.delete(c));
    pump(c);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  device.url = `http://127.0.0.1:${(server.address() as AddressInfo).port}/stream`;
  return device;
}

/** Beat records for a series of RR intervals starting at `startMs` (device clock). */
export function beatRecords(rr: ArrayLike<number>, startMs: number, firstSeq = 1): StreamRecord[] {
  const out: StreamRecord[] = [];
  let t = startMs;
  for (let i = 0; i < rr.length; i++) {
    t += rr[i]!;
    out.push({ kind: "beat", seq: firstSeq + i, tDevice: Math.round(t), rr: rr[i]!, type: "N", quality: 1, leadOff: false });
  }
  return out;
}
