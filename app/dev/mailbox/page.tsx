import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { readStandinMailbox, type MailboxMessage } from "@/lib/mail/standin";

export const metadata: Metadata = { title: "Mailbox (local stand-in)", robots: { index: false } };
export const dynamic = "force-dynamic";

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

// Every message the app sent to the local e-mail stand-in. The page exists
// only while RESEND_BASE_URL is set (404 otherwise, e.g. with real Resend).
// It is open to anyone who can reach the app: the stand-in is a development
// and test tool that listens on 127.0.0.1 and holds only local test mail.
export default async function MailboxPage({ searchParams }: Props) {
  const to = (await searchParams).to;
  let messages: MailboxMessage[] | null;
  let unreachable = false;
  try {
    messages = await readStandinMailbox(typeof to === "string" && to ? to : undefined);
  } catch {
    messages = [];
    unreachable = true;
  }
  if (messages === null) notFound();
  return (
    <div>
      <PageHeader
        title="Mailbox"
        lead="Messages sent to the local e-mail stand-in, newest first. This page exists only while the stand-in is in use; with real Resend it is gone."
      />
      <form method="get" className="mb-6 flex flex-wrap items-end gap-3" role="search">
        <div className="flex flex-col gap-1">
          <label htmlFor="to" className="text-sm font-medium">
            Recipient
          </label>
          <input id="to" name="to" type="email" defaultValue={typeof to === "string" ? to : ""} className="rounded border border-ink-300 bg-white px-3 py-2" />
        </div>
        <button type="submit" className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800">
          Filter
        </button>
      </form>
      {unreachable ? <Alert tone="error">The mail stand-in did not answer. Is `npm start` running?</Alert> : null}
      {messages.length === 0 && !unreachable ? <p className="text-ink-700">No messages.</p> : null}
      <ol className="flex flex-col gap-6">
        {messages.map((m) => (
          <li key={m.id} className="rounded-md border border-ink-200 bg-white" data-testid="mailbox-message">
            <div className="border-b border-ink-200 px-4 py-3">
              <p className="font-semibold">{m.subject}</p>
              <p className="text-sm text-ink-700">
                To {m.to.join(", ")} · from {m.from} · {m.created_at.replace("T", " ").slice(0, 19)} UTC
              </p>
            </div>
            <details className="px-4 py-3">
              <summary className="cursor-pointer text-sm font-medium">Show the message (HTML and plain text)</summary>
              {m.html ? (
                <iframe title={`HTML of: ${m.subject}`} srcDoc={m.html} sandbox="" className="mt-3 h-96 w-full rounded border border-ink-200 bg-white" />
              ) : null}
              {m.text ? <pre className="mt-3 overflow-x-auto whitespace-pre-wrap rounded bg-ink-50 p-3 font-mono text-xs">{m.text}</pre> : null}
            </details>
          </li>
        ))}
      </ol>
    </div>
  );
}
