import { describe, expect, inject, it } from "vitest";

describe("the running app", () => {
  it("answers the health route with the database reachable", async () => {
    const res = await fetch(`${inject("baseUrl")}/api/health`);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: "ok" });
  });
});
