import "server-only";
import { env } from "@/lib/env";
import { buildEditionJob } from "./handlers/build-edition";
import { reviewDigestJob } from "./handlers/review-digest";
import { sendEmailJob } from "./handlers/send-email";
import { testStepsJob } from "./handlers/test-steps";
import type { JobHandler } from "./types";

// Job kind → handler. Adding a job kind is two lines: import its handler and
// add it here (see DEVELOPERS.md, "How to add a job").
export function jobRegistry(): Record<string, JobHandler<never>> {
  const registry: Record<string, JobHandler<never>> = {
    "send-email": sendEmailJob,
    "build-edition": buildEditionJob,
    "review-digest": reviewDigestJob,
  };
  // Test-only kinds, never available in a normal deployment.
  if (env().RAINPRINT_TEST === "1") registry["test-steps"] = testStepsJob;
  return registry;
}
