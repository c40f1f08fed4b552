// One 5-min window of a stay for the Window detail: stored values, quality and parameters, and the plots recomputed
// from the beats (lib/review/window-route.ts: guarded by role and the stay's unit, each read audited).
import { windowDetail } from "@/lib/review/window-detail";
import { windowRoute } from "@/lib/review/window-route";

export const dynamic = "force-dynamic";

export const GET = windowRoute("window.view", (stay, start) => windowDetail(stay, start));
