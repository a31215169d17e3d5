// POST /api/tubs/:tubId/uploads  { contentType, size } → { key, url } for a presigned PUT.
import { z } from "zod";
import { apiTub } from "~/lib/api.server";
import { PhotoError, presignPhotoUpload } from "~/features/readings/readings.server";
import type { Route } from "./+types/tubs.uploads";

const body = z.object({ contentType: z.string(), size: z.number() });

export async function loader({ context, params }: Route.LoaderArgs) {
  await apiTub(context, params.tubId, "care");
  return Response.json({ message: "Send a POST with the photo's type and size." }, { status: 405 });
}

export async function action({ context, params, request }: Route.ActionArgs) {
  const { tub } = await apiTub(context, params.tubId, "care");
  const parsed = body.safeParse(await request.json().catch(() => null));
  if (!parsed.success) return Response.json({ code: "bad_request", message: "The upload request was incomplete. Reload the page and try again." }, { status: 400 });
  try {
    return Response.json(await presignPhotoUpload(tub, parsed.data.contentType, parsed.data.size));
  } catch (error) {
    if (error instanceof PhotoError) return Response.json({ code: error.code, message: error.message }, { status: error.status });
    throw error;
  }
}
