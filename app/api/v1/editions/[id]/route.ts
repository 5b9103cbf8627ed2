import { v1Handler } from "@/lib/api/endpoint";
import { getEditionById } from "@/lib/api/v1";

export const GET = v1Handler(getEditionById);
