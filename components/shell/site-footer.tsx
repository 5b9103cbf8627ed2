import Link from "next/link";

export function SiteFooter() {
  return (
    <footer className="mt-16 border-t border-ink-200 bg-white no-print">
      <div className="mx-auto flex max-w-6xl flex-col gap-2 px-4 py-6 text-sm text-ink-600 sm:flex-row sm:justify-between">
        <p>Rainprint — quality-checked precipitation isotope data and isoscapes. Values in ‰ vs VSMOW.</p>
        <p>
          <Link href="/#cautions" className="underline hover:text-ink-900">
            Read the cautions
          </Link>
        </p>
      </div>
    </footer>
  );
}
