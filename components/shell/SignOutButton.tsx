"use client";
import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button type="button" className="btn-secondary" onClick={() => void signOut({ callbackUrl: "/signin?reason=signed_out" })}>
      Sign out
    </button>
  );
}
