import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PageHeader } from "@/components/ui/page-header";
import { PROBLEM_TYPES, type ProblemType } from "@/lib/errors";

export const metadata: Metadata = { title: "Error type" };

type Props = { params: Promise<{ type: string }> };

// The `type` URI of every application/problem+json answer points here.
export default async function ProblemTypePage({ params }: Props) {
  const { type } = await params;
  if (!Object.hasOwn(PROBLEM_TYPES, type)) notFound();
  const spec: { status: number; title: string; description?: string } = PROBLEM_TYPES[type as ProblemType];
  return (
    <div className="max-w-prose">
      <PageHeader title={spec.title} lead={`Error type “${type}”, HTTP status ${spec.status}.`} />
      {spec.description ? (
        <p className="mb-4 text-ink-800" data-testid="problem-description">
          {spec.description}
        </p>
      ) : null}
      <p className="text-ink-700">
        Rainprint answers failed API requests with <code className="font-mono">application/problem+json</code> (RFC 9457). The member{" "}
        <code className="font-mono">code</code> repeats this type&apos;s name and is stable; <code className="font-mono">detail</code> explains this
        occurrence, and <code className="font-mono">errors</code> lists messages per field where a form was at fault.
      </p>
      <h2 className="mt-6 text-lg font-semibold">All error types</h2>
      <ul className="mt-2 list-disc pl-5 text-sm">
        {Object.entries(PROBLEM_TYPES).map(([k, v]) => (
          <li key={k}>
            <code className="font-mono">{k}</code> — {v.status}, {v.title}
          </li>
        ))}
      </ul>
    </div>
  );
}
