import { v1Handler } from "@/lib/api/endpoint";
import { getStation } from "@/lib/api/v1";

export const GET = v1Handler(getStation);
