"use client";
import { signOut } from "next-auth/react";

export function SignOutButton() {
  return (
    <button type="button" onClick={() => signOut({ callbackUrl: "/sign-in" })} className="text-xs text-ink-soft hover:text-ink underline-offset-2 hover:underline">
      Sign out
    </button>
  );
}
