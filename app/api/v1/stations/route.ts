import { v1Handler } from "@/lib/api/endpoint";
import { listStations } from "@/lib/api/v1";

export const GET = v1Handler(listStations);
