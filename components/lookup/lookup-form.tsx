import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

// The site-lookup form: a plain GET form (works without JavaScript; the map links here with the same query).

export type EditionChoice = { id: string; label: string };

export function LookupForm({
  action = "/lookup",
  values,
  errors,
  editions,
}: {
  action?: string;
  values: { lat?: string; lon?: string; elevation?: string; edition?: string };
  errors?: Partial<Record<"lat" | "lon" | "elevation" | "edition", string>>;
  editions: EditionChoice[];
}) {
  const err = (k: "lat" | "lon" | "elevation" | "edition") => (errors?.[k] ? [errors[k] as string] : undefined);
  return (
    <form method="get" action={action} className="no-print flex flex-col gap-4 rounded-md border border-ink-200 bg-white p-4" data-testid="lookup-form">
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Latitude" name="lat" defaultValue={values.lat ?? ""} placeholder={`46.5042 or 46°30'15"N`} hint="Decimal degrees or degrees, minutes, seconds; south negative or S." errors={err("lat")} required autoComplete="off" />
        <Field label="Longitude" name="lon" defaultValue={values.lon ?? ""} placeholder={`7.2083 or 7°12'30"E`} hint="Decimal degrees or degrees, minutes, seconds; west negative or W." errors={err("lon")} required autoComplete="off" />
        <Field label="Elevation, m (optional)" name="elevation" defaultValue={values.elevation ?? ""} placeholder="1200" hint="Metres above sea level. Empty: sea-level equivalent." errors={err("elevation")} inputMode="decimal" autoComplete="off" />
        <div className="flex flex-col gap-1">
          <label htmlFor="f-edition" className="text-sm font-medium text-ink-900">
            Edition
          </label>
          <p id="f-edition-hint" className="text-xs text-ink-600">
            The current edition unless you pick an earlier one.
          </p>
          <select id="f-edition" name="edition" defaultValue={values.edition ?? ""} aria-describedby="f-edition-hint" className="rounded border border-ink-300 bg-white px-3 py-2 text-base">
            <option value="">Current edition</option>
            {editions.map((e) => (
              <option key={e.id} value={e.id}>
                {e.label}
              </option>
            ))}
          </select>
          {errors?.edition ? <p className="text-sm text-severity-fail">{errors.edition}</p> : null}
        </div>
      </div>
      <div>
        <Button type="submit">Look up this site</Button>
      </div>
    </form>
  );
}
