import { z } from "zod";

// The whole environment, validated once. Every other module reads settings
// through `env()`; nothing else touches process.env for app settings.
const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().min(1).default("file:./data/rainprint.db"),
  DATABASE_AUTH_TOKEN: z.string().optional(),
  APP_URL: z.url().default("http://localhost:3000"),
  NEXTAUTH_SECRET: z.string().min(16, "NEXTAUTH_SECRET must be at least 16 characters").optional(),
  // E-mail: a real key and no RESEND_BASE_URL talks to Resend itself.
  RESEND_API_KEY: z.string().default("re_local_standin"),
  RESEND_BASE_URL: z.url().optional(),
  MAIL_FROM: z.string().default("Rainprint <notices@rainprint.local>"),
  // Payments: real keys and no STRIPE_API_BASE talks to Stripe itself.
  STRIPE_SECRET_KEY: z.string().default("sk_test_local_standin"),
  STRIPE_WEBHOOK_SECRET: z.string().default("whsec_local_standin_secret"),
  STRIPE_API_BASE: z.url().optional(),
  // Seconds a worker holds a job before another may take it over.
  JOB_LEASE_SECONDS: z.coerce.number().int().min(5).max(3600).default(60),
  // API usage counters are kept in memory and written to api_usage at most this often
  // (milliseconds); 0 writes every request through. See lib/api/usage.ts.
  API_USAGE_FLUSH_MS: z.coerce.number().int().min(0).max(60_000).default(500),
  // Worker threads that answer site lookups (lib/editions/predict-pool.ts); unset = one per
  // core, at most 4; 0 = answer on the request's own thread.
  PREDICT_THREADS: z.coerce.number().int().min(0).max(16).optional(),
  // Set by the test runner only: enables test-only helpers on stand-ins.
  RAINPRINT_TEST: z.enum(["0", "1"]).default("0"),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n");
    throw new Error(`Rainprint cannot start: the environment is not valid.\n${lines}`);
  }
  cached = parsed.data;
  return cached;
}

/** For tests that change process.env between cases. */
export function resetEnvCache(): void {
  cached = undefined;
}
