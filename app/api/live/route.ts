// Server-Sent Events to signed-in people: new windows, flags and stream status, only for units in their scope.
// Clinical events go to those who may see the census of that unit; stream status also to biomedical engineers.
import { currentActor } from "@/lib/auth/guard";
import { can, roleAllows, type Grant } from "@/lib/auth/roles";
import { liveHub } from "@/lib/live/listener";
import type { LiveEvent } from "@/lib/live/events";

export const dynamic = "force-dynamic";

function mayReceive(grants: Grant[], e: LiveEvent): boolean {
  if (e.type === "stream") return grants.some((g) => g.unitId === e.unitId && (roleAllows(g.role, "census.view") || g.role === "biomed"));
  return can(grants, "census.view", e.unitId);
}

export async function GET(req: Request) {
  const actor = await currentActor();
  if (!actor) return Response.json({ error: "unauthorized", message: "Sign in first." }, { status: 401 });
  const encoder = new TextEncoder();
  let unsubscribe = () => {};
  let heartbeat: NodeJS.Timeout | undefined;
  const stream = new ReadableStream<Uint8Array>({
    start(controller) {
      const send = (text: string) => {
        try {
          controller.enqueue(encoder.encode(text));
        } catch {
          unsubscribe();
        }
      };
      send("retry: 5000\n\n");
      unsubscribe = liveHub().subscribe((e) => {
        if (mayReceive(actor.grants, e)) send(`event: ${e.type}\ndata: ${JSON.stringify(e)}\n\n`);
      });
      heartbeat = setInterval(() => send(": keep-alive\n\n"), 15_000);
      req.signal.addEventListener("abort", () => {
        unsubscribe();
        clearInterval(heartbeat);
        try {
          controller.close();
        } catch {
          // already closed by the client
        }
      });
    },
    cancel() {
      unsubscribe();
      clearInterval(heartbeat);
    },
  });
  return new Response(stream, {
    headers: { "Content-Type": "text/event-stream", "Cache-Control": "no-store", Connection: "keep-alive" },
  });
}
