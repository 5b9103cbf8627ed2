// The cautions Rainprint shows wherever its numbers could be taken for more
// than they are. `variant="full"` for the landing page and reports;
// "compact" beside a result.

export const CAUTIONS = [
  {
    key: "estimates",
    title: "Estimates, not measurements",
    text: "Predicted values are statistical estimates with stated uncertainty. The interval is part of the answer; a value without it is not a result.",
  },
  {
    key: "provenance",
    title: "Not evidence of origin on its own",
    text: "Conclusions about the origin of people, animals, food or water need accredited laboratory analysis and expert interpretation. A lookup on a surface alone is not evidence.",
  },
  {
    key: "water",
    title: "Not a drinking-water or safety tool",
    text: "Rainprint says nothing about water quality or safety. Water-resource and groundwater decisions follow local regulations and licensed professionals.",
  },
  {
    key: "scale",
    title: "Comparable only on one scale",
    text: "Isotope values can be compared only when normalised to the VSMOW–SLAP scale; the intake asks for the scale and the reference materials used.",
  },
] as const;

export function Cautions({ variant = "full", only }: { variant?: "full" | "compact"; only?: (typeof CAUTIONS)[number]["key"][] }) {
  const items = only ? CAUTIONS.filter((c) => only.includes(c.key)) : CAUTIONS;
  if (variant === "compact") {
    return (
      <aside aria-label="Cautions" className="rounded border border-severity-warn/40 bg-amber-50 p-3 text-sm text-ink-800">
        <ul className="list-disc space-y-1 pl-5">
          {items.map((c) => (
            <li key={c.key}>
              <strong className="font-semibold">{c.title}.</strong> {c.text}
            </li>
          ))}
        </ul>
      </aside>
    );
  }
  return (
    <section aria-labelledby="cautions-heading" id="cautions" className="rounded-md border border-ink-200 bg-white p-5">
      <h2 id="cautions-heading" className="text-lg font-semibold text-ink-900">
        Cautions
      </h2>
      <dl className="mt-3 grid gap-4 sm:grid-cols-2">
        {items.map((c) => (
          <div key={c.key}>
            <dt className="font-semibold text-ink-900">{c.title}</dt>
            <dd className="mt-1 text-ink-700">{c.text}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}
