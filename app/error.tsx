"use client";

import Link from "next/link";

export default function ErrorPage({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div className="max-w-prose" role="alert">
      <h1 className="text-2xl font-semibold">Something went wrong</h1>
      <p className="mt-3 text-ink-700">
        The page could not be shown. Nothing you entered was lost on our side; please try again.
        {error.digest ? ` If it keeps happening, mention reference ${error.digest}.` : ""}
      </p>
      <p className="mt-4 flex gap-4">
        <button type="button" onClick={reset} className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white">
          Try again
        </button>
        <Link href="/" className="self-center underline">
          Rainprint home
        </Link>
      </p>
    </div>
  );
}
