import Link from "next/link";

// Pieces of the API guide page (/api). The page passes plain data taken from
// the endpoint declarations and the OpenAPI document generated from them.

export type GuideParameter = { name: string; in: string; required: boolean; type: string; description: string; defaultValue: string | null };

export type GuideEndpoint = {
  id: string;
  method: string;
  path: string;
  summary: string;
  description: string;
  who: string;
  cost: string;
  parameters: GuideParameter[];
  examples: { title: string; curl: string }[];
  problems: { code: string; status: number; title: string }[];
  responseSchema: string | null;
};

export function CodeBlock({ children, label }: { children: string; label?: string }) {
  return (
    <pre aria-label={label} className="overflow-x-auto rounded border border-ink-200 bg-ink-900 px-3 py-2 font-mono text-xs leading-relaxed text-ink-50">
      <code>{children}</code>
    </pre>
  );
}

export function EndpointSection({ ep }: { ep: GuideEndpoint }) {
  return (
    <section id={ep.id} aria-labelledby={`${ep.id}-heading`} className="flex flex-col gap-3 rounded-md border border-ink-200 bg-white p-5" data-testid="api-endpoint">
      <h3 id={`${ep.id}-heading`} className="flex flex-wrap items-baseline gap-2 text-base font-semibold">
        <span className="rounded bg-tarn-700 px-2 py-0.5 font-mono text-xs text-white">{ep.method}</span>
        <code className="font-mono">{ep.path}</code>
        <span className="font-normal text-ink-700">— {ep.summary}</span>
      </h3>
      <p className="text-ink-800">{ep.description}</p>
      <dl className="grid gap-1 text-sm sm:grid-cols-[10rem_1fr]">
        <dt className="text-ink-600">Who may call</dt>
        <dd>{ep.who}</dd>
        <dt className="text-ink-600">Quota</dt>
        <dd>{ep.cost}</dd>
        {ep.responseSchema ? (
          <>
            <dt className="text-ink-600">Answer</dt>
            <dd>
              JSON, schema <code className="font-mono">{ep.responseSchema}</code> in the <Link href="/api/v1/openapi.json" className="underline">OpenAPI document</Link>
            </dd>
          </>
        ) : null}
      </dl>
      {ep.parameters.length ? (
        <div className="overflow-x-auto">
          <table className="w-full min-w-[36rem] text-left text-sm">
            <caption className="sr-only">Parameters of {ep.path}</caption>
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-1 pr-3 font-medium">Parameter</th>
                <th scope="col" className="py-1 pr-3 font-medium">In</th>
                <th scope="col" className="py-1 pr-3 font-medium">Type</th>
                <th scope="col" className="py-1 font-medium">Meaning</th>
              </tr>
            </thead>
            <tbody>
              {ep.parameters.map((p) => (
                <tr key={`${p.in}:${p.name}`} className="border-b border-ink-100 align-top">
                  <td className="py-1 pr-3 font-mono">
                    {p.name}
                    {p.required ? <span className="ml-1 text-xs text-severity-fail">required</span> : null}
                  </td>
                  <td className="py-1 pr-3">{p.in}</td>
                  <td className="py-1 pr-3">{p.type}</td>
                  <td className="py-1">
                    {p.description}
                    {p.defaultValue !== null ? <span className="text-ink-600"> Default {p.defaultValue}.</span> : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      {ep.examples.map((ex) => (
        <div key={ex.title} className="flex flex-col gap-1">
          <p className="text-sm font-medium">{ex.title}</p>
          <CodeBlock label={`Example: ${ex.title}`}>{ex.curl}</CodeBlock>
        </div>
      ))}
      <p className="text-sm text-ink-700">
        Errors:{" "}
        {ep.problems.map((p, i) => (
          <span key={p.code}>
            {i ? ", " : ""}
            <Link href={`/problems/${p.code}`} className="underline">
              {p.code}
            </Link>{" "}
            ({p.status})
          </span>
        ))}
      </p>
    </section>
  );
}
