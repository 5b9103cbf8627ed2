import { z } from "zod";
import { route } from "@/lib/http/route";
import { reviewQueue } from "@/lib/intake/review";

const query = z.object({
  sort: z.enum(["age", "station", "contributor", "severity", "samples"]).optional(),
  dir: z.enum(["asc", "desc"]).optional(),
  station: z.string().trim().max(40).optional(),
  contributor: z.string().trim().max(80).optional(),
  severity: z.enum(["fail", "warn", "note", "clean"]).optional(),
  page: z.coerce.number().int().min(1).max(10_000).optional(),
  pageSize: z.coerce.number().int().min(5).max(100).optional(),
});

// GET: open batches for the review desk (moderators).
export const GET = route({ auth: { roles: ["moderator", "admin"] }, query }, async ({ query }) => {
  return Response.json(await reviewQueue(query));
});
