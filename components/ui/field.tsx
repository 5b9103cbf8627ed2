import type { InputHTMLAttributes } from "react";

/** A labelled input with hint and error text wired up with aria attributes. */
export function Field({
  label,
  name,
  hint,
  errors,
  ...input
}: { label: string; name: string; hint?: string; errors?: string[] } & InputHTMLAttributes<HTMLInputElement>) {
  const id = input.id ?? `f-${name}`;
  const hintId = hint ? `${id}-hint` : undefined;
  const errId = errors?.length ? `${id}-error` : undefined;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-medium text-ink-900">
        {label}
      </label>
      {hint ? (
        <p id={hintId} className="text-xs text-ink-600">
          {hint}
        </p>
      ) : null}
      <input
        id={id}
        name={name}
        aria-invalid={errors?.length ? true : undefined}
        aria-describedby={[hintId, errId].filter(Boolean).join(" ") || undefined}
        className="rounded border border-ink-300 bg-white px-3 py-2 text-base text-ink-900 placeholder:text-ink-400 aria-[invalid=true]:border-severity-fail"
        {...input}
      />
      {errors?.length ? (
        <p id={errId} className="text-sm text-severity-fail">
          {errors.join(" ")}
        </p>
      ) : null}
    </div>
  );
}
