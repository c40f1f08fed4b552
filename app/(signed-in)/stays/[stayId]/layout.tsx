// Every stay-addressed screen (Night review, Window detail, Handoff summary) sits behind the stay guard: role and
// the stay's unit. Pages guard their own data too, since they render beside this layout.
import { guardStayPage } from "@/lib/review/stay-guard";

export default async function StayLayout({ children, params }: { children: React.ReactNode; params: Promise<{ stayId: string }> }) {
  await guardStayPage("trends.view", (await params).stayId);
  return children;
}
