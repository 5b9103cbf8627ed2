import { listUsers, listUsersQuery } from "@/lib/admin/users";
import { route } from "@/lib/http/route";

export const GET = route({ auth: { roles: ["admin"] }, query: listUsersQuery }, async ({ query }) => Response.json(await listUsers(query)));
