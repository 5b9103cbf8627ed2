import { describe, expect, it } from "vitest";
import { AppError, PROBLEM_TYPES, problemBody, toProblemResponse } from "@/lib/errors";

describe("problem bodies of the public API", () => {
  it("quota-exceeded: 429, Retry-After, and the violated policies as an extension member", async () => {
    const res = toProblemResponse(
      new AppError("quota-exceeded", { detail: "Used up.", retryAfterS: 3600.2, extensions: { "violated-policies": ["daily"] } }),
      "/api/v1/stations",
    );
    expect(res.status).toBe(429);
    expect(res.headers.get("retry-after")).toBe("3601");
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(await res.json()).toEqual({
      type: "/problems/quota-exceeded",
      title: "The daily quota is used up",
      status: 429,
      code: "quota-exceeded",
      detail: "Used up.",
      instance: "/api/v1/stations",
      "violated-policies": ["daily"],
    });
  });

  it("invalid-api-key is 401 and plan-required is 403, each explained on its /problems page", () => {
    expect(problemBody(new AppError("invalid-api-key", { detail: "Unknown key." }))).toMatchObject({ status: 401, code: "invalid-api-key", type: "/problems/invalid-api-key" });
    expect(problemBody(new AppError("plan-required", { extensions: { "required-plan": "researcher" } }))).toMatchObject({ status: 403, "required-plan": "researcher" });
    for (const t of ["invalid-api-key", "plan-required", "quota-exceeded"] as const) expect(PROBLEM_TYPES[t].description.length).toBeGreaterThan(40);
  });

  it("extension members never overwrite the standard members, and are hidden on unexposed errors", () => {
    const body = problemBody(new AppError("plan-required", { extensions: { status: 200, code: "x", extra: 1 } }));
    expect(body.status).toBe(403);
    expect(body.code).toBe("plan-required");
    expect(body.extra).toBe(1);
    expect(problemBody(new AppError("internal", { extensions: { secret: "y" } })).secret).toBeUndefined();
  });
});
