"use client";

import { useState } from "react";
import { problemMessage, sendJson, type ClientProblem } from "@/lib/client-fetch";

/** Form state for a JSON submit: pending flag, the problem (message + field errors), the success data. */
export function useFormSend<T = { message?: string }>() {
  const [pending, setPending] = useState(false);
  const [problem, setProblem] = useState<ClientProblem | null>(null);
  const [data, setData] = useState<T | null>(null);
  async function send(url: string, body: unknown, method: "POST" | "PATCH" = "POST"): Promise<T | null> {
    setPending(true);
    setProblem(null);
    const r = await sendJson<T>(url, body, method);
    setPending(false);
    if (r.ok) {
      setData(r.data);
      return r.data;
    }
    setProblem(r.problem);
    return null;
  }
  const fieldErrors = (name: string) => problem?.errors?.[name];
  return { pending, problem, message: problem ? problemMessage(problem) : null, data, send, fieldErrors, reset: () => setData(null) };
}
