// The Research panel of one window: chaos and power-law measures on the hour around it, with their caveats. Research
// only, never used for flags (lib/review/window-route.ts: guarded by role and the stay's unit, each read audited).
import { windowResearch } from "@/lib/review/research";
import { windowRoute } from "@/lib/review/window-route";

export const dynamic = "force-dynamic";

export const GET = windowRoute("window.research.view", (stay, start) => windowResearch(stay, start));
