// Role and plan names for client components (type-only: nothing of db/ is bundled).
export type { Plan, Role } from "@/db/schema";
