import { guardPage } from "@/lib/auth/guard";

export default async function MailboxLayout({ children }: { children: React.ReactNode }) {
  await guardPage("mailbox.view");
  return children;
}
