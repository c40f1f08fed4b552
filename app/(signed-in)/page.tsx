import { redirect } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { landingPath } from "@/lib/auth/navigation";

export default async function Home() {
  const actor = await guardPage();
  redirect(landingPath(actor.grants) ?? "/forbidden");
}
