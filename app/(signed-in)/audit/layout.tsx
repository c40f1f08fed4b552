import { guardPage } from "@/lib/auth/guard";

export default async function AuditLayout({ children }: { children: React.ReactNode }) {
  await guardPage("audit.view");
  return children;
}
