import Link from "next/link";

export default function Forbidden() {
  return (
    <div className="max-w-prose">
      <h1 className="text-2xl font-semibold">Not available to your account</h1>
      <p className="mt-3 text-ink-700">
        You are signed in, but this page needs a different role or plan. If you think you should have access, ask an administrator.
      </p>
      <p className="mt-4 flex gap-4">
        <Link href="/account" className="underline">
          Your account
        </Link>
        <Link href="/" className="underline">
          Rainprint home
        </Link>
      </p>
    </div>
  );
}
