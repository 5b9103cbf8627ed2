import type { Metadata } from "next";
import Link from "next/link";
import { UserControls } from "@/components/admin/user-controls";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { listUsers, listUsersQuery } from "@/lib/admin/users";
import { requirePageViewer } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Users" };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function AdminUsersPage({ searchParams }: Props) {
  const viewer = await requirePageViewer({ roles: ["admin"], path: "/admin/users" });
  const raw = await searchParams;
  const parsed = listUsersQuery.safeParse({
    q: typeof raw.q === "string" ? raw.q : undefined,
    role: typeof raw.role === "string" && raw.role ? raw.role : undefined,
    page: typeof raw.page === "string" ? raw.page : undefined,
  });
  const query = parsed.success ? parsed.data : { page: 1 };
  const { rows, total, page, pageSize } = await listUsers(query);
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const link = (p: number) => `/admin/users?${new URLSearchParams({ ...(query.q ? { q: query.q } : {}), ...(query.role ? { role: query.role } : {}), page: String(p) })}`;
  return (
    <div>
      <PageHeader title="Users" lead="Change roles and disable accounts. Every change is recorded in the audit trail with who made it." />
      {!parsed.success ? <Alert tone="warn">The search was not understood and has been reset.</Alert> : null}
      <form method="get" className="mb-4 flex flex-wrap items-end gap-3" role="search">
        <div className="flex flex-col gap-1">
          <label htmlFor="q" className="text-sm font-medium">
            Search by name, e-mail or affiliation
          </label>
          <input id="q" name="q" defaultValue={query.q ?? ""} className="rounded border border-ink-300 bg-white px-3 py-2" />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="role" className="text-sm font-medium">
            Role
          </label>
          <select id="role" name="role" defaultValue={query.role ?? ""} className="rounded border border-ink-300 bg-white px-3 py-2">
            <option value="">any</option>
            <option value="contributor">contributor</option>
            <option value="moderator">moderator</option>
            <option value="admin">admin</option>
          </select>
        </div>
        <button type="submit" className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800">
          Search
        </button>
      </form>
      <p className="mb-2 text-sm text-ink-700">
        {total} {total === 1 ? "account" : "accounts"}
      </p>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[44rem] text-left text-sm">
          <thead className="border-b border-ink-300 text-ink-700">
            <tr>
              <th scope="col" className="py-2 pr-4 font-medium">Name</th>
              <th scope="col" className="py-2 pr-4 font-medium">E-mail</th>
              <th scope="col" className="py-2 pr-4 font-medium">Role</th>
              <th scope="col" className="py-2 pr-4 font-medium">State</th>
              <th scope="col" className="py-2 font-medium">Change</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((u) => (
              <tr key={u.id} className="border-b border-ink-100 align-top">
                <td className="py-2 pr-4">
                  {u.name ?? "—"}
                  {u.isDemo ? <span className="ml-2 rounded bg-ink-100 px-1 text-xs text-ink-700">synthetic demo data</span> : null}
                </td>
                <td className="py-2 pr-4">{u.email}</td>
                <td className="py-2 pr-4 capitalize">{u.role}</td>
                <td className="py-2 pr-4">{u.disabledAt ? "disabled" : u.emailVerified ? "active" : "unconfirmed"}</td>
                <td className="py-2">
                  <UserControls id={u.id} email={u.email} role={u.role} disabled={Boolean(u.disabledAt)} self={u.id === viewer.id} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pages > 1 ? (
        <nav aria-label="Pages" className="mt-4 flex gap-3 text-sm">
          {page > 1 ? <Link href={link(page - 1)} className="underline">Previous</Link> : null}
          <span>
            Page {page} of {pages}
          </span>
          {page < pages ? <Link href={link(page + 1)} className="underline">Next</Link> : null}
        </nav>
      ) : null}
    </div>
  );
}
