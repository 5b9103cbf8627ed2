// Argument checks shared by the science functions. They throw TypeError for a
// value of the wrong kind (NaN, missing, not a number) and RangeError for a
// number outside what the formula accepts; messages say what to do.

/** Throws TypeError unless `value` is a finite number. Returns it for chaining. */
export function requireFinite(name: string, value: unknown, unit = ""): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    const shown = typeof value === "number" ? String(value) : value === undefined ? "missing" : JSON.stringify(value);
    throw new TypeError(`${name} must be a finite number${unit ? ` in ${unit}` : ""}; got ${shown}.`);
  }
  return value;
}

/** Throws unless `min <= value <= max` (bounds inclusive unless told otherwise). */
export function requireInRange(
  name: string,
  value: unknown,
  min: number,
  max: number,
  opts: { unit?: string; minExclusive?: boolean; maxExclusive?: boolean; why?: string } = {},
): number {
  const v = requireFinite(name, value, opts.unit);
  const lowOk = opts.minExclusive ? v > min : v >= min;
  const highOk = opts.maxExclusive ? v < max : v <= max;
  if (!lowOk || !highOk) {
    const lo = opts.minExclusive ? "(" : "[";
    const hi = opts.maxExclusive ? ")" : "]";
    const unit = opts.unit ? ` ${opts.unit}` : "";
    throw new RangeError(
      `${name} = ${v}${unit} is outside ${lo}${min}, ${max}${hi}${unit}${opts.why ? `: ${opts.why}` : ""}.`,
    );
  }
  return v;
}

/** True for a finite number (the test used wherever data may be missing). */
export function isFiniteNumber(value: unknown): value is number {
  return typeof value === "number" && Number.isFinite(value);
}
