"use server";

import { redirect } from "next/navigation";
import type { ActionState } from "@/components/billing/action-form";
import { requireViewer } from "@/lib/auth/guard";
import { beginCheckout, beginPortal, checkoutInput, portalInput } from "@/lib/billing/overview";
import { toAppError } from "@/lib/errors";

// The billing buttons' server actions: guard, parse, act, then send the browser
// to Stripe (Checkout or the billing portal). Failures come back as a message.

function pick(form: FormData, keys: readonly string[]): Record<string, string> {
  const out: Record<string, string> = {};
  for (const k of keys) {
    const v = form.get(k);
    if (typeof v === "string") out[k] = v;
  }
  return out;
}

function failure(e: unknown): ActionState {
  const err = toAppError(e);
  if (err.status >= 500) console.error("[rainprint] billing action", err.cause ?? err);
  return { error: err.expose ? (err.detail ?? err.title) : "Payments are not available at the moment. Please try again later.", fields: err.expose ? err.fields : undefined };
}

export async function checkoutAction(_prev: ActionState, form: FormData): Promise<ActionState> {
  let url: string;
  try {
    const viewer = await requireViewer();
    const input = checkoutInput.parse(pick(form, ["plan", "interval", "seats", "organizationId", "organizationName"]));
    url = (await beginCheckout(viewer, input)).url;
  } catch (e) {
    return failure(e);
  }
  redirect(url);
}

export async function portalAction(_prev: ActionState, form: FormData): Promise<ActionState> {
  let url: string;
  try {
    const viewer = await requireViewer();
    url = (await beginPortal(viewer, portalInput.parse(pick(form, ["organizationId"])))).url;
  } catch (e) {
    return failure(e);
  }
  redirect(url);
}
