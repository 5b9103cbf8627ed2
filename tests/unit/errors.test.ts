import { describe, expect, it } from "vitest";
import { z } from "zod";
import { AppError, errors, problemBody, toProblemResponse, zodFieldErrors } from "@/lib/errors";
import { readBodyLimited, readStructuredBody } from "@/lib/http/body";

describe("problem responses (RFC 9457)", () => {
  it("turns an AppError into application/problem+json with a stable type", async () => {
    const res = toProblemResponse(errors.forbidden("Admins only."), "/api/x");
    expect(res.status).toBe(403);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(await res.json()).toEqual({ type: "/problems/forbidden", title: "Not allowed", status: 403, code: "forbidden", detail: "Admins only.", instance: "/api/x" });
  });

  it("gives field messages for zod errors", async () => {
    const schema = z.object({ email: z.email({ error: "Enter a valid e-mail address." }), n: z.number() });
    const parsed = schema.safeParse({ email: "nope", n: "x" });
    expect(parsed.success).toBe(false);
    const res = toProblemResponse(parsed.error);
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.code).toBe("invalid-input");
    expect(body.errors.email).toEqual(["Enter a valid e-mail address."]);
    expect(Object.keys(body.errors)).toContain("n");
    expect(zodFieldErrors(parsed.error!).email).toHaveLength(1);
  });

  it("hides the message of unexpected errors", async () => {
    const original = console.error;
    console.error = () => {};
    try {
      const res = toProblemResponse(new Error("SQLITE_BUSY: secret internals"));
      expect(res.status).toBe(500);
      const text = await res.text();
      expect(text).not.toContain("SQLITE_BUSY");
      expect(JSON.parse(text).code).toBe("internal");
    } finally {
      console.error = original;
    }
  });

  it("sets Retry-After for rate limits", () => {
    const res = toProblemResponse(errors.tooManyRequests("Slow down.", 61.2));
    expect(res.status).toBe(429);
    expect(res.headers.get("retry-after")).toBe("62");
  });

  it("does not expose details of 5xx AppErrors unless told to", () => {
    const body = problemBody(new AppError("internal", { detail: "db path /x" }));
    expect(body.detail).not.toContain("/x");
  });
});

describe("request body limits", () => {
  it("refuses a declared Content-Length over the limit before reading", async () => {
    const req = new Request("http://x/", { method: "POST", body: "x".repeat(100), headers: { "content-length": "100" } });
    await expect(readBodyLimited(req, 10)).rejects.toMatchObject({ status: 413, type: "body-too-large" });
  });

  it("counts bytes while reading a streamed body without Content-Length", async () => {
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        for (let i = 0; i < 10; i++) c.enqueue(new Uint8Array(1000));
        c.close();
      },
    });
    const req = new Request("http://x/", { method: "POST", body: stream, duplex: "half" } as RequestInit);
    await expect(readBodyLimited(req, 5000)).rejects.toMatchObject({ status: 413 });
  });

  it("parses JSON and URL-encoded forms, and refuses other types", async () => {
    const json = new Request("http://x/", { method: "POST", body: '{"a":1}', headers: { "content-type": "application/json" } });
    expect(await readStructuredBody(json)).toEqual({ a: 1 });
    const form = new Request("http://x/", { method: "POST", body: "a=1&b=two", headers: { "content-type": "application/x-www-form-urlencoded" } });
    expect(await readStructuredBody(form)).toEqual({ a: "1", b: "two" });
    const bad = new Request("http://x/", { method: "POST", body: "{", headers: { "content-type": "application/json" } });
    await expect(readStructuredBody(bad)).rejects.toMatchObject({ type: "malformed-body", status: 400 });
    const xml = new Request("http://x/", { method: "POST", body: "<a/>", headers: { "content-type": "application/xml" } });
    await expect(readStructuredBody(xml)).rejects.toMatchObject({ status: 415 });
  });
});
