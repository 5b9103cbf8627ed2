// The local payments stand-in, started by `npm start` and the end-to-end tests
// (scripts/lib/services.mjs). It plays Stripe for the `stripe` SDK on
// 127.0.0.1 only; see DEVELOPERS.md, "Billing and the payments stand-in".
//
// Settings (this program's own, not the app's):
//   STRIPE_STANDIN_PORT         port to listen on (required)
//   STRIPE_STANDIN_HOST         interface (default 127.0.0.1; containers set 0.0.0.0)
//   STRIPE_STANDIN_WEBHOOK_URL  where signed events are POSTed (unset: no delivery)
//   STRIPE_WEBHOOK_SECRET       signing secret shared with the app
//   STRIPE_SECRET_KEY           the key the SDK must present
//   STRIPE_STANDIN_STATE        JSON state file (default data/stripe-standin.json;
//                               "memory" keeps nothing; memory by default under RAINPRINT_TEST=1)
//   STRIPE_STANDIN_PUBLIC_URL   base URL browsers use for its pages (default http://127.0.0.1:<port>)
//   STRIPE_STANDIN_CONTROL=1    serve the /_standin control API (always on under RAINPRINT_TEST=1)
import path from "node:path";
import { z } from "zod";
import { startStripeStandin } from "./stripe/server";

const settings = z
  .object({
    STRIPE_STANDIN_PORT: z.coerce.number().int().min(1).max(65_535),
    STRIPE_STANDIN_HOST: z.string().min(1).default("127.0.0.1"),
    STRIPE_STANDIN_WEBHOOK_URL: z.url().optional(),
    STRIPE_WEBHOOK_SECRET: z.string().min(1).default("whsec_local_standin_secret"),
    STRIPE_SECRET_KEY: z.string().min(1).default("sk_test_local_standin"),
    STRIPE_STANDIN_STATE: z.string().optional(),
    STRIPE_STANDIN_PUBLIC_URL: z.url().optional(),
    STRIPE_STANDIN_CONTROL: z.enum(["0", "1"]).optional(),
    RAINPRINT_TEST: z.enum(["0", "1"]).default("0"),
  })
  .safeParse(process.env);

if (!settings.success) {
  console.error(
    "payments stand-in: invalid settings\n" +
      settings.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n"),
  );
  process.exit(2);
}
const s = settings.data;
const testing = s.RAINPRINT_TEST === "1";
const stateSetting = s.STRIPE_STANDIN_STATE ?? (testing ? "memory" : "data/stripe-standin.json");

// No top-level await: tsx runs this file as CommonJS.
void startStripeStandin({
  port: s.STRIPE_STANDIN_PORT,
  host: s.STRIPE_STANDIN_HOST,
  publicUrl: s.STRIPE_STANDIN_PUBLIC_URL,
  webhookUrl: s.STRIPE_STANDIN_WEBHOOK_URL ?? null,
  webhookSecret: s.STRIPE_WEBHOOK_SECRET,
  apiKey: s.STRIPE_SECRET_KEY,
  statePath: stateSetting === "memory" ? null : path.resolve(stateSetting),
  control: testing || s.STRIPE_STANDIN_CONTROL === "1",
}).then(
  (standin) => {
    console.log(`payments stand-in listening on ${standin.url} (state: ${stateSetting})`);
    let stopping = false;
    const stop = () => {
      if (stopping) return;
      stopping = true;
      void standin.close().then(() => process.exit(0));
    };
    process.on("SIGTERM", stop);
    process.on("SIGINT", stop);
  },
  (e: unknown) => {
    console.error(`payments stand-in could not start: ${(e as Error).message}`);
    process.exit(1);
  },
);
