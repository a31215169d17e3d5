// POST /api/tubs/:tubId/photos  { key } → registers the uploaded photo, reads it, { readingId, duplicate }.
import { z } from "zod";
import { apiTub } from "~/lib/api.server";
import { PhotoError, registerPhoto } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.photos";

const body = z.object({ key: z.string() });

export async function loader({ context, params }: Route.LoaderArgs) {
  await apiTub(context, params.tubId, "care");
  return Response.json({ message: "Send a POST with the uploaded photo's key." }, { status: 405 });
}

export async function action({ context, params, request }: Route.ActionArgs) {
  const { user, tub } = await apiTub(context, params.tubId, "care");
  const parsed = body.safeParse(await request.json().catch(() => null));
  if (!parsed.success) return Response.json({ code: "bad_request", message: "The photo could not be registered. Reload the page and try again." }, { status: 400 });
  try {
    const result = await registerPhoto(user, tub, parsed.data.key);
    return Response.json(result, { status: result.duplicate ? 200 : 201 });
  } catch (error) {
    if (error instanceof PhotoError) return Response.json({ code: error.code, message: error.message }, { status: error.status });
    throw error;
  }
}
