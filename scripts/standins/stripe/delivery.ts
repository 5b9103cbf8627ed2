// Webhook delivery as Stripe does it: POST the event JSON with a
// `Stripe-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256 of "t.payload" keyed
// by the endpoint secret>` header; retry on anything but a 2xx.
//
// `t` is the real wall-clock time of the attempt, never the simulated clock:
// receivers check it against their own clock (5 minutes' tolerance in the SDK).
import { createHmac } from "node:crypto";
import type { DeliveryRec, EventRec, StandinState } from "./store";

export function signatureHeader(payload: string, secret: string, timestampSeconds: number): string {
  const v1 = createHmac("sha256", secret).update(`${timestampSeconds}.${payload}`, "utf8").digest("hex");
  return `t=${timestampSeconds},v1=${v1}`;
}

export interface DeliveryOptions {
  url: string | null;
  secret: string;
  state: () => StandinState;
  save: () => void;
  log: (msg: string) => void;
}

export class WebhookDelivery {
  /** First attempts go out one at a time, in the order events were created. */
  private chain: Promise<void> = Promise.resolve();
  private readonly timers = new Set<NodeJS.Timeout>();
  private closed = false;

  constructor(private readonly opts: DeliveryOptions) {}

  get enabled(): boolean {
    return this.opts.url !== null;
  }

  /** A new event: deliver it (after those before it), or hold it while deliveries are on hold. */
  enqueue(ev: EventRec): void {
    if (!this.enabled) return;
    if (this.opts.state().webhooksHeld) {
      ev.held = true;
      return;
    }
    this.push(() => this.attempt(ev, "auto"));
  }

  /** Queue work behind earlier attempts; one failure never stalls the queue. */
  private push(work: () => Promise<unknown>): Promise<void> {
    this.chain = this.chain.then(work).then(
      () => undefined,
      (e: unknown) => this.opts.log(`webhook delivery error: ${(e as Error).message}`),
    );
    return this.chain;
  }

  /** Resolves when every first attempt queued so far has finished. */
  idle(): Promise<void> {
    return this.chain;
  }

  /** Deliver held events: those named first, in that order, then the rest in creation order. */
  async release(order: string[] = []): Promise<void> {
    const state = this.opts.state();
    state.webhooksHeld = false;
    const held = state.events.filter((e) => e.held);
    const named = order.map((id) => held.find((e) => e.id === id)).filter((e): e is EventRec => !!e);
    const rest = held.filter((e) => !named.includes(e));
    for (const ev of [...named, ...rest]) {
      ev.held = false;
      void this.push(() => this.attempt(ev, "auto"));
    }
    await this.chain;
  }

  /** Deliver one event now, again or for the first time (control API replay). */
  async deliverNow(ev: EventRec): Promise<DeliveryRec> {
    ev.held = false;
    let result: DeliveryRec = { at: Math.floor(Date.now() / 1000), status: null, error: "not attempted", kind: "manual" };
    await this.push(async () => {
      result = await this.attempt(ev, "manual", false);
    });
    return result;
  }

  private async attempt(ev: EventRec, kind: DeliveryRec["kind"], retryOnFailure = true): Promise<DeliveryRec> {
    const url = this.opts.url;
    const t = Math.floor(Date.now() / 1000);
    const rec: DeliveryRec = { at: t, status: null, error: null, kind };
    if (!url || this.closed) {
      rec.error = "no webhook endpoint";
      return rec;
    }
    try {
      const res = await fetch(url, {
        method: "POST",
        headers: {
          "Content-Type": "application/json; charset=utf-8",
          "Stripe-Signature": signatureHeader(ev.payload, this.opts.secret, t),
          "User-Agent": "Stripe/1.0 (+https://stripe.com/docs/webhooks)",
        },
        body: ev.payload,
        signal: AbortSignal.timeout(15_000),
      });
      rec.status = res.status;
      // Drain the body so the connection can be reused.
      await res.arrayBuffer().catch(() => undefined);
    } catch (e) {
      rec.error = (e as Error).message;
    }
    ev.deliveries.push(rec);
    const ok = rec.status !== null && rec.status >= 200 && rec.status < 300;
    if (ok) ev.delivered = true;
    else {
      this.opts.log(`webhook ${ev.type} ${ev.id} → ${rec.status ?? rec.error}`);
      if (retryOnFailure) this.scheduleRetry(ev);
    }
    this.opts.save();
    return rec;
  }

  private scheduleRetry(ev: EventRec): void {
    if (this.closed) return;
    const failures = ev.deliveries.filter((d) => d.kind !== "manual").length;
    const delays = this.opts.state().settings.webhookRetryDelaysMs;
    const delay = delays[failures - 1];
    if (delay === undefined) return;
    const timer = setTimeout(() => {
      this.timers.delete(timer);
      if (ev.delivered || this.closed) return;
      void this.push(() => this.attempt(ev, "retry"));
    }, delay);
    timer.unref();
    this.timers.add(timer);
  }

  /** Wait for the queue, then forget pending retries (control API reset). */
  async reset(): Promise<void> {
    await this.chain.catch(() => undefined);
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
  }

  close(): void {
    this.closed = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
  }
}
