import Link from "next/link";
import type { Plan, Role } from "@/lib/auth/kinds";
import { navFor } from "./nav-items";
import { SignOutButton } from "./sign-out-button";

export type HeaderViewer = { name: string | null; email: string; role: Role; plan: Plan } | null;

const PLAN_LABEL: Record<Plan, string> = { open: "Open", researcher: "Researcher", institution: "Institution" };

/** Top bar: brand, the navigation the viewer may see, and who is signed in. Works without JavaScript. */
export function SiteHeader({ viewer }: { viewer: HeaderViewer }) {
  const main = navFor(viewer, "main");
  const account = navFor(viewer, "account");
  const links = (
    <>
      {main.map((i) => (
        <li key={i.href}>
          <Link href={i.href} className="block rounded px-2 py-2 text-ink-800 hover:bg-ink-100 hover:text-ink-900">
            {i.label}
          </Link>
        </li>
      ))}
    </>
  );
  return (
    <header className="border-b border-ink-200 bg-white no-print">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
        <Link href="/" className="flex items-center gap-2 text-lg font-bold tracking-wide text-ink-900" aria-label="Rainprint, home">
          <svg aria-hidden="true" width="22" height="22" viewBox="0 0 22 22">
            <path d="M11 2 C11 2 4 10 4 14 a7 7 0 0 0 14 0 C18 10 11 2 11 2 Z" fill="#24858c" />
            <path d="M7.5 14.5 h7 M8.5 17 h5" stroke="#fbfcfd" strokeWidth="1.4" strokeLinecap="round" />
          </svg>
          Rainprint
        </Link>
        <nav aria-label="Main" className="order-3 w-full md:order-none md:w-auto md:flex-1">
          <ul className="flex flex-wrap gap-1 text-sm">{links}</ul>
        </nav>
        <div className="ml-auto flex items-center gap-2 text-sm">
          {viewer ? (
            <span className="hidden text-ink-600 sm:inline" data-testid="viewer-badge">
              {viewer.name ?? viewer.email} · <span className="capitalize">{viewer.role}</span> · {PLAN_LABEL[viewer.plan]} plan
            </span>
          ) : null}
          <ul className="flex items-center gap-1">
            {account.map((i) => (
              <li key={i.href}>
                <Link
                  href={i.href}
                  className={
                    i.href === "/sign-up"
                      ? "block rounded bg-tarn-700 px-3 py-2 font-medium text-white hover:bg-tarn-800"
                      : "block rounded px-2 py-2 text-ink-800 hover:bg-ink-100"
                  }
                >
                  {i.label}
                </Link>
              </li>
            ))}
            {viewer ? (
              <li>
                <SignOutButton />
              </li>
            ) : null}
          </ul>
        </div>
      </div>
    </header>
  );
}
