// GET /tubs/:tubId/photos/:photoId: the strip photo, streamed from storage to those who may see the tub;
// ?size=thumb gives a small WebP for lists.
import { streamObject } from "~/lib/storage.server";
import { photoForTub, thumbnailKey } from "~/features/readings/readings.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/photo";

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const p = await photoForTub(tub, params.photoId);
  if (!p) return new Response("We could not find that photo.", { status: 404 });
  if (new URL(request.url).searchParams.get("size") === "thumb") {
    const thumb = await thumbnailKey(p);
    if (thumb) return streamObject(thumb, "image/webp");
  }
  return streamObject(p.s3Key, p.contentType);
}
