// Sending a photo from the browser, the same way for every photo Dipwell takes (strip photos,
// chart-card photos, reference-solution photos): ask the app for a presigned upload (the type and
// size are signed into it), PUT the file straight to storage with progress, a stall timeout and
// cancel. The caller then registers the upload key with its own endpoint.

/** No byte sent for this long: the upload is given up as stalled (the user can try again). */
export const STALL_MS = 30_000;

export class UploadStopped extends Error {
  constructor(public why: "cancelled" | "stalled" | "network" | "refused") {
    super(why);
  }
}

/** The app refused to start the upload (wrong type, too large, storage down…): its words, and whether trying again can help. */
export class UploadRefused extends Error {
  constructor(
    message: string,
    public retry: boolean,
  ) {
    super(message);
  }
}

export const STOPPED_WORDS: Record<UploadStopped["why"], string> = {
  cancelled: "Upload cancelled. Your photo is still here: send it when you are ready.",
  stalled: "The upload stalled: nothing got through for 30 seconds. Your photo is still here: press “Try the upload again”, perhaps nearer the router or on mobile data.",
  network: "The upload stopped before it finished (the connection dropped). Your photo is still here: press “Try the upload again”.",
  refused: "Photo storage did not take the photo. Your photo is still here: press “Try the upload again”.",
};

export function putFile(url: string, file: File, contentType: string, onProgress: (loaded: number, total: number) => void, signal: AbortSignal) {
  return new Promise<void>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    let stall: ReturnType<typeof setTimeout>;
    const arm = () => {
      clearTimeout(stall);
      stall = setTimeout(() => {
        reject(new UploadStopped("stalled"));
        xhr.abort();
      }, STALL_MS);
    };
    const done = (fn: () => void) => {
      clearTimeout(stall);
      signal.removeEventListener("abort", onAbort);
      fn();
    };
    const onAbort = () => {
      done(() => reject(new UploadStopped("cancelled")));
      xhr.abort();
    };
    signal.addEventListener("abort", onAbort);
    xhr.open("PUT", url);
    xhr.setRequestHeader("Content-Type", contentType);
    xhr.upload.onprogress = (e) => {
      arm();
      onProgress(e.loaded, e.lengthComputable ? e.total : file.size);
    };
    xhr.onload = () => done(() => (xhr.status >= 200 && xhr.status < 300 ? resolve() : reject(new UploadStopped("refused"))));
    xhr.onerror = () => done(() => reject(new UploadStopped("network")));
    arm();
    xhr.send(file);
  });
}

export async function postJson(url: string, body: unknown, signal: AbortSignal) {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body), signal });
  const json = (await res.json().catch(() => ({}))) as Record<string, unknown>;
  return { status: res.status, json };
}

/** Presigned upload then PUT: the upload key to register. Throws UploadRefused or UploadStopped. */
export async function sendPhoto(uploadsUrl: string, file: File, onProgress: (loaded: number, total: number) => void, signal: AbortSignal) {
  const presign = await postJson(uploadsUrl, { contentType: file.type, size: file.size }, signal);
  if (presign.status !== 200) throw new UploadRefused(String(presign.json.message ?? "The upload could not start. Try again."), presign.status >= 500);
  const { url, key, contentType } = presign.json as { url: string; key: string; contentType: string };
  await putFile(url, file, contentType, onProgress, signal);
  return key;
}
