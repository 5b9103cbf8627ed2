import Link from "next/link";

export default function NotFound() {
  return (
    <div className="max-w-prose">
      <h1 className="text-2xl font-semibold">Nothing here</h1>
      <p className="mt-3 text-ink-700">There is no page at this address, or it is not shown to your account. Check the address, or go back to the start.</p>
      <p className="mt-4">
        <Link href="/" className="underline">
          Rainprint home
        </Link>
      </p>
    </div>
  );
}
