import { createApiDocument } from "@/lib/api/openapi";

/** The API's OpenAPI 3.1 description; public, since it describes only what a token may do. */
export function GET(): Response {
  return Response.json(createApiDocument());
}
