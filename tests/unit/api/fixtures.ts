import { getDb } from "@/db";
import { batches, memberships, organizations, samples, stations, subscriptions, users } from "@/db/schema";
import { loadViewer, type Viewer } from "@/lib/auth/guard";

// People, organisations and stations for the API tests (invented; written straight to the test database).

let n = 0;
const next = () => `${Date.now().toString(36)}-${++n}`;

export async function person(label: string): Promise<{ id: string; viewer: () => Promise<Viewer> }> {
  const u = await getDb()
    .insert(users)
    .values({ email: `${label}-${next()}@tests.example`, name: label, emailVerified: new Date() })
    .returning()
    .get();
  return { id: u.id, viewer: async () => (await loadViewer(u.id))! };
}

/** A person with an active Researcher subscription of their own. */
export async function researcher(label = "researcher") {
  const p = await person(label);
  const id = next();
  await getDb().insert(subscriptions).values({ userId: p.id, plan: "researcher", interval: "month", status: "active", stripeCustomerId: `cus_${id}`, stripeSubscriptionId: `sub_${id}` });
  return p;
}

/** An organisation on the Institution plan with an owner and a member. */
export async function institution(label = "org") {
  const db = getDb();
  const id = next();
  const org = await db.insert(organizations).values({ name: `${label} ${id}`, slug: `${label}-${id}` }).returning().get();
  const owner = await person(`${label}-owner`);
  const member = await person(`${label}-member`);
  await db.insert(memberships).values([
    { organizationId: org.id, userId: owner.id, role: "owner" },
    { organizationId: org.id, userId: member.id, role: "member" },
  ]);
  await db.insert(subscriptions).values({ organizationId: org.id, plan: "institution", interval: "year", status: "active", seats: 3, stripeCustomerId: `cus_${id}`, stripeSubscriptionId: `sub_${id}` });
  return { org, owner, member };
}

/** An approved station with accepted monthly samples over `years` years (δ18O −8‰ in winter, −4‰ in summer; δ2H = 8·δ18O + 10). */
export async function stationWithSamples(code: string, opts: { years?: number; lat?: number; lon?: number; isDemo?: boolean; status?: "approved" | "pending" } = {}) {
  const db = getDb();
  const owner = await person(`op-${code}`);
  const st = await db
    .insert(stations)
    .values({ code, name: `Station ${code}`, lat: opts.lat ?? 47.5, lon: opts.lon ?? 9.5, elevationM: 420, collectorType: "bulk-oil", status: opts.status ?? "approved", operatingOrg: "Test Basin Cooperative", isDemo: opts.isDemo ?? true })
    .returning()
    .get();
  const b = await db.insert(batches).values({ contributorId: owner.id, source: "form", status: "decided" }).returning().get();
  const rows = [];
  for (let y = 0; y < (opts.years ?? 3); y++) {
    for (let m = 1; m <= 12; m++) {
      const year = 2022 + y;
      const start = `${year}-${String(m).padStart(2, "0")}-01`;
      const end = m === 12 ? `${year + 1}-01-01` : `${year}-${String(m + 1).padStart(2, "0")}-01`;
      const d18O = m >= 5 && m <= 9 ? -4 : -8;
      rows.push({ batchId: b.id, stationId: st.id, status: "accepted" as const, startDate: start, endDate: end, amountMm: 50, d18O, d2H: 8 * d18O + 10, dExcess: 10, decidedAt: new Date() });
    }
  }
  await db.insert(samples).values(rows);
  return st;
}
