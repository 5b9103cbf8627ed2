// Stripe's request encoding: application/x-www-form-urlencoded bodies (and
// query strings for GET/DELETE) with nested keys, as the SDK writes them:
//   metadata[user_id]=u1, line_items[0][price]=price_1, expand[0]=subscription,
//   lookup_keys[]=a (both indexed and empty-bracket arrays are accepted).
// An empty value means "unset" (Stripe's convention for clearing a field).

export type FormValue = string | FormObject | FormValue[];
export interface FormObject {
  [key: string]: FormValue;
}

const FORBIDDEN = new Set(["__proto__", "constructor", "prototype"]);

export class StripeApiError extends Error {
  constructor(
    readonly status: number,
    readonly type: "invalid_request_error" | "idempotency_error" | "card_error" | "api_error",
    message: string,
    readonly code?: string,
    readonly param?: string,
  ) {
    super(message);
  }
  body() {
    return {
      error: {
        type: this.type,
        message: this.message,
        ...(this.code ? { code: this.code } : {}),
        ...(this.param ? { param: this.param } : {}),
      },
    };
  }
}

function splitKey(key: string): string[] {
  const m = /^([^[\]]+)((?:\[[^[\]]*\])*)$/.exec(key);
  if (!m) throw new StripeApiError(400, "invalid_request_error", `Invalid parameter name: ${key}`, "parameter_invalid");
  const parts = [m[1]];
  for (const seg of m[2].matchAll(/\[([^[\]]*)\]/g)) parts.push(seg[1]);
  for (const p of parts)
    if (FORBIDDEN.has(p))
      throw new StripeApiError(400, "invalid_request_error", `Invalid parameter name: ${key}`, "parameter_invalid");
  return parts;
}

/** Turn objects whose keys are all array indices into arrays, recursively. */
function normalise(v: FormValue): FormValue {
  if (typeof v === "string") return v;
  if (Array.isArray(v)) return v.map(normalise);
  const keys = Object.keys(v);
  if (keys.length > 0 && keys.every((k) => /^\d+$/.test(k))) {
    return keys
      .map(Number)
      .sort((a, b) => a - b)
      .map((k) => normalise(v[String(k)]));
  }
  const out: FormObject = {};
  for (const k of keys) out[k] = normalise(v[k]);
  return out;
}

/** Parse a form-encoded body or query string into nested objects and arrays. */
export function parseForm(encoded: string): FormObject {
  const root: FormObject = {};
  for (const [rawKey, value] of new URLSearchParams(encoded)) {
    const path = splitKey(rawKey);
    let node: FormObject = root;
    for (let i = 0; i < path.length; i++) {
      const last = i === path.length - 1;
      let part = path[i];
      if (part === "") {
        // `a[]=x`: append at the next free index of this level.
        part = String(Object.keys(node).length);
      }
      if (last) {
        node[part] = value;
      } else {
        const next = node[part];
        if (next === undefined || typeof next === "string" || Array.isArray(next)) {
          const created: FormObject = {};
          node[part] = created;
          node = created;
        } else {
          node = next;
        }
      }
    }
  }
  return normalise(root) as FormObject;
}

/** Typed, validated access to one level of request parameters. */
export class Params {
  constructor(
    readonly raw: FormObject,
    private readonly prefix = "",
  ) {}

  static of(raw: FormObject, allowed: readonly string[]): Params {
    const allow = new Set([...allowed, "expand"]);
    for (const k of Object.keys(raw))
      if (!allow.has(k))
        throw new StripeApiError(400, "invalid_request_error", `Received unknown parameter: ${k}`, "parameter_unknown", k);
    return new Params(raw);
  }

  private name(key: string) {
    return this.prefix ? `${this.prefix}[${key}]` : key;
  }

  has(key: string): boolean {
    return this.raw[key] !== undefined;
  }

  str(key: string): string | undefined {
    const v = this.raw[key];
    if (v === undefined || v === "") return undefined;
    if (typeof v !== "string")
      throw new StripeApiError(400, "invalid_request_error", `Invalid string: ${this.name(key)}`, "parameter_invalid_string", this.name(key));
    return v;
  }

  reqStr(key: string): string {
    const v = this.str(key);
    if (v === undefined)
      throw new StripeApiError(400, "invalid_request_error", `Missing required param: ${this.name(key)}.`, "parameter_missing", this.name(key));
    return v;
  }

  oneOf<T extends string>(key: string, values: readonly T[]): T | undefined {
    const v = this.str(key);
    if (v === undefined) return undefined;
    if (!(values as readonly string[]).includes(v))
      throw new StripeApiError(
        400,
        "invalid_request_error",
        `Invalid ${this.name(key)}: must be one of ${values.join(", ")}`,
        "parameter_invalid_string",
        this.name(key),
      );
    return v as T;
  }

  int(key: string, opts: { min?: number; max?: number } = {}): number | undefined {
    const v = this.str(key);
    if (v === undefined) return undefined;
    if (!/^-?\d+$/.test(v))
      throw new StripeApiError(400, "invalid_request_error", `Invalid integer: ${v}`, "parameter_invalid_integer", this.name(key));
    const n = Number(v);
    if ((opts.min !== undefined && n < opts.min) || (opts.max !== undefined && n > opts.max))
      throw new StripeApiError(
        400,
        "invalid_request_error",
        `Invalid ${this.name(key)}: must be between ${opts.min ?? "-∞"} and ${opts.max ?? "∞"}`,
        "parameter_invalid_integer",
        this.name(key),
      );
    return n;
  }

  bool(key: string): boolean | undefined {
    const v = this.str(key);
    if (v === undefined) return undefined;
    if (v !== "true" && v !== "false")
      throw new StripeApiError(400, "invalid_request_error", `Invalid boolean: ${v}`, "parameter_invalid_boolean", this.name(key));
    return v === "true";
  }

  /** A nested object (`key[...]=`), or undefined. */
  obj(key: string, allowed?: readonly string[]): Params | undefined {
    const v = this.raw[key];
    if (v === undefined || v === "") return undefined;
    if (typeof v === "string" || Array.isArray(v))
      throw new StripeApiError(400, "invalid_request_error", `Invalid object: ${this.name(key)}`, "parameter_invalid", this.name(key));
    if (allowed) {
      for (const k of Object.keys(v))
        if (!allowed.includes(k))
          throw new StripeApiError(
            400,
            "invalid_request_error",
            `Received unknown parameter: ${this.name(key)}[${k}]`,
            "parameter_unknown",
            `${this.name(key)}[${k}]`,
          );
    }
    return new Params(v, this.name(key));
  }

  /** An array of nested objects (`key[0][...]=`). */
  objArray(key: string, allowed?: readonly string[]): Params[] {
    const v = this.raw[key];
    if (v === undefined || v === "") return [];
    if (!Array.isArray(v))
      throw new StripeApiError(400, "invalid_request_error", `Invalid array: ${this.name(key)}`, "parameter_invalid", this.name(key));
    return v.map((item, i) => {
      const name = `${this.name(key)}[${i}]`;
      if (typeof item === "string" || Array.isArray(item))
        throw new StripeApiError(400, "invalid_request_error", `Invalid object: ${name}`, "parameter_invalid", name);
      if (allowed)
        for (const k of Object.keys(item))
          if (!allowed.includes(k))
            throw new StripeApiError(400, "invalid_request_error", `Received unknown parameter: ${name}[${k}]`, "parameter_unknown", `${name}[${k}]`);
      return new Params(item, name);
    });
  }

  /** An array of strings (`key[0]=a&key[1]=b` or `key[]=a`). */
  strArray(key: string): string[] {
    const v = this.raw[key];
    if (v === undefined || v === "") return [];
    if (!Array.isArray(v) || v.some((x) => typeof x !== "string"))
      throw new StripeApiError(400, "invalid_request_error", `Invalid array: ${this.name(key)}`, "parameter_invalid", this.name(key));
    return v as string[];
  }

  /**
   * Metadata as Stripe merges it: new keys are added, a key sent empty is removed,
   * `metadata=` (empty) clears everything. Returns the merged result.
   */
  metadata(key: string, current: Record<string, string> = {}): Record<string, string> {
    const v = this.raw[key];
    if (v === undefined) return current;
    if (v === "") return {};
    if (typeof v === "string" || Array.isArray(v))
      throw new StripeApiError(400, "invalid_request_error", `Invalid hash: ${this.name(key)}`, "parameter_invalid", this.name(key));
    const out = { ...current };
    for (const [k, val] of Object.entries(v)) {
      if (typeof val !== "string")
        throw new StripeApiError(400, "invalid_request_error", `Invalid metadata value for ${k}`, "parameter_invalid", `${this.name(key)}[${k}]`);
      if (k.length > 40)
        throw new StripeApiError(400, "invalid_request_error", `Metadata keys are at most 40 characters: ${k}`, "parameter_invalid", this.name(key));
      if (val.length > 500)
        throw new StripeApiError(400, "invalid_request_error", `Metadata values are at most 500 characters: ${k}`, "parameter_invalid", this.name(key));
      if (val === "") delete out[k];
      else out[k] = val;
    }
    return out;
  }

  expand(): string[] {
    return this.strArray("expand");
  }
}
