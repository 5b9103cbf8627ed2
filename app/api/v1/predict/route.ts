import { v1Handler } from "@/lib/api/endpoint";
import { predictBatch, predictSite } from "@/lib/api/v1";

export const GET = v1Handler(predictSite);
export const POST = v1Handler(predictBatch);
