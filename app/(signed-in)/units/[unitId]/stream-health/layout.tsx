import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export default async function StreamHealthLayout({ children, params }: { children: React.ReactNode; params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  await guardPage("devices.view", unitId.data);
  return children;
}
