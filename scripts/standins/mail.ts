// A local stand-in for the Resend e-mail API, for development and tests.
// Listens on 127.0.0.1 only (port MAIL_STANDIN_PORT; MAIL_STANDIN_HOST for containers). Implements what the
// Resend SDK calls: POST /emails and POST /emails/batch (snake_case JSON,
// answers { id } / { data: [{ id }] }); requires an `Authorization: Bearer …`
// header and honours `Idempotency-Key`. Every message is recorded: in memory,
// and in the JSON file MAIL_STANDIN_STORE when set, so a restart keeps the
// mailbox. For tests and the /dev/mailbox page:
//   GET    /_standin/messages[?to=address]   newest first
//   GET    /_standin/messages/:id
//   DELETE /_standin/messages                empties the mailbox
//   GET    /health
import { randomUUID } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import http from "node:http";
import path from "node:path";

export type StoredMessage = {
  id: string;
  from: string;
  to: string[];
  cc: string[];
  bcc: string[];
  reply_to: string[];
  subject: string;
  html: string | null;
  text: string | null;
  created_at: string;
};

const port = Number(process.env.MAIL_STANDIN_PORT || 4010);
// 127.0.0.1 unless told otherwise (docker-compose sets 0.0.0.0 inside its private network).
const host = process.env.MAIL_STANDIN_HOST || "127.0.0.1";
const store = process.env.MAIL_STANDIN_STORE ? path.resolve(process.env.MAIL_STANDIN_STORE) : null;
const MAX_BODY_BYTES = 5 * 1024 * 1024;

let messages: StoredMessage[] = [];
const idempotency = new Map<string, string[]>();

if (store && existsSync(store)) {
  try {
    messages = JSON.parse(readFileSync(store, "utf8")) as StoredMessage[];
  } catch {
    messages = [];
  }
}

function persist() {
  if (!store) return;
  mkdirSync(path.dirname(store), { recursive: true });
  const tmp = `${store}.tmp`;
  writeFileSync(tmp, JSON.stringify(messages));
  renameSync(tmp, store);
}

function list(v: unknown): string[] {
  if (Array.isArray(v)) return v.map(String);
  if (typeof v === "string" && v) return [v];
  return [];
}

function send(res: http.ServerResponse, status: number, body: unknown) {
  res.writeHead(status, { "Content-Type": "application/json" });
  res.end(JSON.stringify(body));
}

function error(res: http.ServerResponse, status: number, name: string, message: string) {
  send(res, status, { statusCode: status, name, message });
}

/** Validate one e-mail in Resend's request shape; returns an error message or the stored message. */
function accept(body: Record<string, unknown>): StoredMessage | string {
  const to = list(body.to);
  if (typeof body.from !== "string" || !body.from) return "The `from` field is missing.";
  if (to.length === 0) return "The `to` field is missing.";
  if (typeof body.subject !== "string" || !body.subject) return "The `subject` field is missing.";
  if (typeof body.html !== "string" && typeof body.text !== "string") return "Provide `html` or `text`.";
  return {
    id: randomUUID(),
    from: body.from,
    to,
    cc: list(body.cc),
    bcc: list(body.bcc),
    reply_to: list(body.reply_to),
    subject: body.subject,
    html: typeof body.html === "string" ? body.html : null,
    text: typeof body.text === "string" ? body.text : null,
    created_at: new Date().toISOString(),
  };
}

async function readJson(req: http.IncomingMessage): Promise<unknown> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const c of req) {
    size += (c as Buffer).length;
    if (size > MAX_BODY_BYTES) throw new Error("too large");
    chunks.push(c as Buffer);
  }
  return JSON.parse(Buffer.concat(chunks).toString("utf8"));
}

const server = http.createServer(async (req, res) => {
  const url = new URL(req.url ?? "/", `http://127.0.0.1:${port}`);
  try {
    if (req.method === "GET" && url.pathname === "/health") return send(res, 200, { status: "ok", messages: messages.length });

    if (url.pathname === "/_standin/messages") {
      if (req.method === "GET") {
        const to = url.searchParams.get("to")?.toLowerCase();
        const found = to ? messages.filter((m) => m.to.some((t) => t.toLowerCase() === to)) : messages;
        return send(res, 200, { data: [...found].reverse() });
      }
      if (req.method === "DELETE") {
        messages = [];
        idempotency.clear();
        persist();
        return send(res, 200, { deleted: true });
      }
    }
    const one = url.pathname.match(/^\/_standin\/messages\/([\w-]+)$/);
    if (one && req.method === "GET") {
      const m = messages.find((x) => x.id === one[1]);
      return m ? send(res, 200, m) : error(res, 404, "not_found", "No such message.");
    }

    if (req.method === "POST" && (url.pathname === "/emails" || url.pathname === "/emails/batch")) {
      if (!/^Bearer \S+/.test(req.headers.authorization ?? "")) return error(res, 401, "missing_api_key", "Missing API key in the authorization header.");
      const key = req.headers["idempotency-key"];
      const idemKey = typeof key === "string" ? `${url.pathname}:${key}` : null;
      if (idemKey && idempotency.has(idemKey)) {
        const ids = idempotency.get(idemKey)!;
        return url.pathname === "/emails" ? send(res, 200, { id: ids[0] }) : send(res, 200, { data: ids.map((id) => ({ id })) });
      }
      let body: unknown;
      try {
        body = await readJson(req);
      } catch {
        return error(res, 422, "validation_error", "The body is not valid JSON (or is larger than 5 MB).");
      }
      const items = url.pathname === "/emails" ? [body] : body;
      if (!Array.isArray(items) || items.length === 0 || items.length > 100)
        return error(res, 422, "validation_error", "Send one e-mail object, or an array of 1–100 for /emails/batch.");
      const accepted: StoredMessage[] = [];
      for (const item of items) {
        if (!item || typeof item !== "object") return error(res, 422, "validation_error", "Each e-mail must be an object.");
        const m = accept(item as Record<string, unknown>);
        if (typeof m === "string") return error(res, 422, "validation_error", m);
        accepted.push(m);
      }
      messages.push(...accepted);
      persist();
      const ids = accepted.map((m) => m.id);
      if (idemKey) idempotency.set(idemKey, ids);
      return url.pathname === "/emails" ? send(res, 200, { id: ids[0] }) : send(res, 200, { data: ids.map((id) => ({ id })) });
    }
    return error(res, 404, "not_found", `No route for ${req.method} ${url.pathname} on the mail stand-in.`);
  } catch (e) {
    return error(res, 500, "application_error", e instanceof Error ? e.message : String(e));
  }
});

server.listen(port, host, () => {
  console.log(`[mail stand-in] listening on http://${host}:${port}${store ? ` (mailbox kept in ${path.relative(process.cwd(), store)})` : ""}`);
});

for (const sig of ["SIGTERM", "SIGINT"] as const) {
  process.on(sig, () => server.close(() => process.exit(0)));
}
