// Client-safe helper for forms: send JSON to a route handler and get either
// the data or the problem (RFC 9457) it answered with. No server imports.

export type ClientProblem = {
  title: string;
  detail?: string;
  code: string;
  status: number;
  errors?: Record<string, string[]>;
};

export type SendResult<T> = { ok: true; status: number; data: T } | { ok: false; problem: ClientProblem };

export async function sendJson<T = unknown>(url: string, body: unknown, method: "POST" | "PATCH" | "PUT" | "DELETE" = "POST"): Promise<SendResult<T>> {
  let res: Response;
  try {
    res = await fetch(url, { method, headers: { "Content-Type": "application/json", Accept: "application/json" }, body: JSON.stringify(body) });
  } catch {
    return { ok: false, problem: { title: "No connection", detail: "The server could not be reached. Check your connection and try again.", code: "network", status: 0 } };
  }
  const type = res.headers.get("content-type") ?? "";
  const json = type.includes("json") ? await res.json().catch(() => null) : null;
  if (res.ok) return { ok: true, status: res.status, data: json as T };
  if (json && typeof json === "object" && "title" in json) return { ok: false, problem: json as ClientProblem };
  return { ok: false, problem: { title: "Something went wrong", detail: `The server answered ${res.status}.`, code: "unknown", status: res.status } };
}

/** The message to show for a problem: its detail, else its title. */
export function problemMessage(p: ClientProblem): string {
  return p.detail ?? p.title;
}
