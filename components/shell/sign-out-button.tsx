"use client";

import { signOut } from "next-auth/react";

export function SignOutButton({ className }: { className?: string }) {
  return (
    <button
      type="button"
      onClick={() => void signOut({ callbackUrl: "/" })}
      className={className ?? "rounded px-2 py-2 text-ink-800 hover:bg-ink-100"}
    >
      Sign out
    </button>
  );
}
