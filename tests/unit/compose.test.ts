import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";

type Service = { image?: string; build?: unknown; command?: string[]; environment?: Record<string, string>; depends_on?: Record<string, unknown> };

const compose = parse(readFileSync("docker-compose.yml", "utf8"), { merge: true }) as { services: Record<string, Service> };

describe("docker-compose.yml", () => {
  it("has the app, the worker, a libSQL server, migrations and both stand-ins", () => {
    expect(Object.keys(compose.services).sort()).toEqual(["app", "db", "mail", "migrate", "payments", "worker"]);
    expect(compose.services.db.image).toMatch(/^ghcr\.io\/tursodatabase\/libsql-server/);
  });

  it("points every database user at the libSQL server", () => {
    for (const name of ["app", "worker", "migrate"]) {
      const env = compose.services[name].environment!;
      expect(env.DATABASE_URL, name).toBe("http://db:8080");
      expect(compose.services[name].depends_on, name).toBeDefined();
    }
    expect(compose.services.migrate.depends_on).toHaveProperty("db");
    expect(compose.services.app.depends_on).toHaveProperty("migrate");
  });

  it("wires e-mail and payments to the stand-ins and requires a session secret", () => {
    for (const name of ["app", "worker"]) {
      const env = compose.services[name].environment!;
      expect(env.RESEND_BASE_URL).toBe("http://mail:4010");
      expect(env.STRIPE_API_BASE).toBe("http://payments:4020");
      expect(env.NEXTAUTH_SECRET).toMatch(/\$\{NEXTAUTH_SECRET:\?/);
    }
    expect(compose.services.mail.environment!.MAIL_STANDIN_PORT).toBe("4010");
    expect(compose.services.payments.environment!.STRIPE_STANDIN_PORT).toBe("4020");
  });

  it("runs the worker and the stand-ins with the project's own scripts", () => {
    expect(compose.services.worker.command).toEqual(["node_modules/.bin/tsx", "--conditions=react-server", "scripts/worker.ts"]);
    expect(compose.services.mail.command?.at(-1)).toBe("scripts/standins/mail.ts");
    expect(compose.services.payments.command?.at(-1)).toBe("scripts/standins/stripe.ts");
    expect(compose.services.app.command).toContain("start");
  });
});
