import { describe, expect, it } from "vitest";
import { hashPassword, passwordProblem, PASSWORD_MIN_LENGTH, verifyPassword } from "@/lib/auth/password";

describe("password policy", () => {
  it("refuses short passwords", () => {
    expect(passwordProblem("short1!")).toMatch(String(PASSWORD_MIN_LENGTH));
  });
  it("refuses common passwords, also with a number added or in other case", () => {
    expect(passwordProblem("password123")).toMatch(/common/);
    expect(passwordProblem("QWERTYUIOP")).toMatch(/common/);
    expect(passwordProblem("sunshine2024")).toMatch(/common/);
  });
  it("refuses repeated characters and runs", () => {
    expect(passwordProblem("aaaaaaaaaaaa")).toMatch(/repeated/);
    expect(passwordProblem("abcdefghijkl")).toMatch(/consecutive/);
  });
  it("refuses the e-mail address or name inside the password", () => {
    expect(passwordProblem("marianne-2026!", { email: "marianne@lab.example" })).toMatch(/e-mail/);
    expect(passwordProblem("xxpellemarshxx", { name: "Pelle Marsh" })).toMatch(/name/);
  });
  it("refuses more than bcrypt's 72 bytes", () => {
    expect(passwordProblem("é".repeat(40))).toMatch(/72/);
  });
  it("accepts a long passphrase", () => {
    expect(passwordProblem("tarn above the scree at dawn")).toBeNull();
    expect(passwordProblem("demo-moderator-pass")).toBeNull();
  });
  it("hashes with bcrypt and verifies", async () => {
    const h = await hashPassword("tarn above the scree");
    expect(h).toMatch(/^\$2[aby]\$10\$/);
    expect(await verifyPassword("tarn above the scree", h)).toBe(true);
    expect(await verifyPassword("tarn above the scree!", h)).toBe(false);
  });
});
