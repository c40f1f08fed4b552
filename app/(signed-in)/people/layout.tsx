import { guardPage } from "@/lib/auth/guard";

export default async function PeopleLayout({ children }: { children: React.ReactNode }) {
  await guardPage("people.manage");
  return children;
}
