// Helpers for the JSON routes: anonymous → 401, a tub the user may not see → 404, all as JSON.
import { GetObjectCommand } from "@aws-sdk/client-s3";
import type { RouterContextProvider } from "react-router";
import type { SessionUser } from "~/lib/auth.server";
import { optionalUser } from "~/lib/session.server";
import { bucket, s3 } from "~/lib/storage.server";
import { requireTub, type TubNeed } from "~/lib/tubs.server";

type Ctx = Readonly<RouterContextProvider>;

export async function apiTub(context: Ctx, tubId: string | undefined, need: TubNeed) {
  const user: SessionUser | null = optionalUser(context);
  if (!user) throw Response.json({ message: "Please sign in first." }, { status: 401 });
  try {
    const found = await requireTub(user, tubId, need);
    return { user, ...found };
  } catch (thrown) {
    const t = thrown as { type?: string; data?: { message?: string }; init?: { status?: number } };
    if (t?.type === "DataWithResponseInit") throw Response.json(t.data ?? {}, { status: t.init?.status ?? 404 });
    throw thrown;
  }
}

/** Streams an object from storage to the browser (private, cached briefly). */
export async function streamObject(key: string, contentType: string) {
  try {
    const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
    const body = out.Body!.transformToWebStream();
    const headers = new Headers({ "content-type": out.ContentType ?? contentType, "cache-control": "private, max-age=3600" });
    if (out.ContentLength) headers.set("content-length", String(out.ContentLength));
    return new Response(body as ReadableStream, { headers });
  } catch {
    return new Response("The photo is not in storage.", { status: 404 });
  }
}
