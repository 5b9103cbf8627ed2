import { v1Handler } from "@/lib/api/endpoint";
import { listEditions } from "@/lib/api/v1";

export const GET = v1Handler(listEditions);
