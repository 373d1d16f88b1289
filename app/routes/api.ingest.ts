import { handleHttpIngest } from "~/.server/ingest/http";
import type { Route } from "./+types/api.ingest";

// Sensors authenticate with their own secret (checked in handleHttpIngest), not a session.
export async function loader() {
  return Response.json(
    { error: "POST readings here with Authorization: Bearer <sensor id>.<secret>" },
    { status: 405 },
  );
}

export async function action({ request, context }: Route.ActionArgs) {
  return handleHttpIngest(request, context.services.writer);
}
