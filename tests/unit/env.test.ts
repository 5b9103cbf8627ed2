import { afterEach, describe, expect, it } from "vitest";
import { env, resetEnvCache } from "@/lib/env";

describe("environment validation", () => {
  const saved = { ...process.env };
  afterEach(() => {
    process.env = { ...saved };
    resetEnvCache();
  });

  it("fills defaults for a fresh clone", () => {
    delete process.env.APP_URL;
    resetEnvCache();
    expect(env().APP_URL).toBe("http://localhost:3000");
    expect(env().JOB_LEASE_SECONDS).toBe(60);
  });

  it("refuses an invalid setting and names it", () => {
    process.env.APP_URL = "not a url";
    resetEnvCache();
    expect(() => env()).toThrow(/APP_URL/);
  });
});
