import { v1Handler } from "@/lib/api/endpoint";
import { openApiDocument } from "@/lib/api/v1";

export const GET = v1Handler(openApiDocument);
