// The one decode of a photo, with no server dependencies, so a reader process of the worker's
// pool can run it as well as the web app: the real type from the bytes, a file that ends early
// refused, the upright size and a small WebP thumbnail from the same pass.
import sharp from "sharp";
import { PHOTO_MESSAGES, typeOfFormat, type PhotoType } from "./rules";

/** A refusal the user sees, in plain words, with the HTTP status it goes out with. */
export class PhotoError extends Error {
  constructor(
    public code: string,
    message: string,
    public status = 400,
  ) {
    super(message);
  }
}

export type Inspected = { type: PhotoType; width: number; height: number; thumb: Buffer };

/**
 * Decodes in this process, one at a time. The image library works on Node's small shared pool of
 * threads, where page compression and file reads wait their turn too: fifty photos registered at
 * once would fill it, and every other page would queue behind their decodes. One at a time, a
 * page's turn comes after one decode at most.
 */
let decoding: Promise<unknown> = Promise.resolve();
function oneDecodeAtATime<T>(work: () => Promise<T>): Promise<T> {
  const turn = decoding.then(work, work);
  decoding = turn.catch(() => {});
  return turn;
}

/**
 * The one decode of a photo: its real type from the bytes (whatever it was called), a file that
 * ends early refused, the upright size, and a small WebP thumbnail from the same pass.
 */
export async function decodePhoto(bytes: Buffer, declared?: PhotoType): Promise<Inspected> {
  if (bytes.length === 0) throw new PhotoError("empty", PHOTO_MESSAGES.empty);
  return oneDecodeAtATime(() => decodeOnce(bytes, declared));
}

async function decodeOnce(bytes: Buffer, declared?: PhotoType): Promise<Inspected> {
  let meta: Awaited<ReturnType<ReturnType<typeof sharp>["metadata"]>>;
  const image = sharp(bytes, { failOn: "truncated", limitInputPixels: 100_000_000 });
  try {
    meta = await image.metadata();
  } catch {
    throw new PhotoError("not_image", PHOTO_MESSAGES.notImage);
  }
  const type = typeOfFormat(meta.format);
  if (!type) throw new PhotoError("wrong_type", PHOTO_MESSAGES.wrongType);
  if (declared && declared !== type) throw new PhotoError("wrong_type", PHOTO_MESSAGES.notWhatItClaims);
  let thumb: Buffer;
  try {
    thumb = await image.rotate().resize(160, 160, { fit: "cover" }).webp({ quality: 70 }).toBuffer();
  } catch (error) {
    const text = String((error as Error).message ?? "");
    if (/truncat|premature|end of|incomplete|corrupt|damaged|unexpected/i.test(text)) throw new PhotoError("truncated", PHOTO_MESSAGES.truncated);
    throw new PhotoError("not_image", PHOTO_MESSAGES.notImage);
  }
  const width = meta.autoOrient?.width ?? meta.width ?? 0;
  const height = meta.autoOrient?.height ?? meta.height ?? 0;
  return { type, width, height, thumb };
}

