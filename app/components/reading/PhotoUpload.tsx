// Choosing the strip photo (camera on a phone, drag and drop or a file on a desktop), the upload
// straight to storage through a presigned PUT with a real progress bar, and the server's reading.
import { useCallback, useRef, useState } from "react";
import { useDropzone } from "react-dropzone";
import { Button, Notice, cx } from "~/components/ui";

const TYPES = ["image/jpeg", "image/png", "image/webp"];
const mb = (b: number) => `${Math.round((b / 1024 / 1024) * 10) / 10} MB`;

type Phase =
  | { kind: "idle" }
  | { kind: "uploading"; loaded: number; total: number }
  | { kind: "reading" }
  | { kind: "error"; message: string; retry: boolean };

export function checkFile(file: File, maxBytes: number): string | null {
  if (!TYPES.includes(file.type)) {
    return `“${file.name}” is not a photo Dipwell can read. Choose a JPEG, PNG or WebP photo (on an iPhone, set Camera › Formats to “Most Compatible”).`;
  }
  if (file.size === 0) return "That file is empty. Take the photo again.";
  if (file.size > maxBytes) return `That photo is ${mb(file.size)}; the largest Dipwell accepts is ${mb(maxBytes)}. Take it again at a lower resolution, or crop it around the strip.`;
  return null;
}

function put(url: string, file: File, contentType: string, onProgress: (loaded: number, total: number) => void) {
  return new Promise<void>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("PUT", url);
    xhr.setRequestHeader("Content-Type", contentType);
    xhr.upload.onprogress = (e) => onProgress(e.loaded, e.lengthComputable ? e.total : file.size);
    xhr.onload = () => (xhr.status >= 200 && xhr.status < 300 ? resolve() : reject(new Error(`storage answered ${xhr.status}`)));
    xhr.onerror = () => reject(new Error("network"));
    xhr.onabort = () => reject(new Error("aborted"));
    xhr.ontimeout = () => reject(new Error("timeout"));
    xhr.send(file);
  });
}

async function postJson(url: string, body: unknown) {
  const res = await fetch(url, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
  const json = (await res.json().catch(() => ({}))) as Record<string, unknown>;
  return { status: res.status, json };
}

export function PhotoUpload({ tubId, maxBytes, onRead }: { tubId: string; maxBytes: number; onRead: (readingId: string, duplicate: boolean) => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<string | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const cameraRef = useRef<HTMLInputElement>(null);

  const upload = useCallback(
    async (f: File) => {
      setPhase({ kind: "uploading", loaded: 0, total: f.size });
      try {
        const presign = await postJson(`/api/tubs/${tubId}/uploads`, { contentType: f.type, size: f.size });
        if (presign.status !== 200) {
          setPhase({ kind: "error", message: String(presign.json.message ?? "The upload could not start. Try again."), retry: presign.status >= 500 });
          return;
        }
        const { url, key, contentType } = presign.json as { url: string; key: string; contentType: string };
        try {
          await put(url, f, contentType, (loaded, total) => setPhase({ kind: "uploading", loaded, total }));
        } catch {
          setPhase({ kind: "error", message: "The upload stopped before it finished (the connection dropped). Your photo is still here: press “Try the upload again”.", retry: true });
          return;
        }
        setPhase({ kind: "reading" });
        const reg = await postJson(`/api/tubs/${tubId}/photos`, { key });
        if (reg.status === 200 || reg.status === 201) {
          onRead(String(reg.json.readingId), Boolean(reg.json.duplicate));
          return;
        }
        setPhase({ kind: "error", message: String(reg.json.message ?? "The photo could not be registered. Try again."), retry: reg.status === 409 || reg.status >= 500 });
      } catch {
        setPhase({ kind: "error", message: "Dipwell could not be reached. Check your connection, then press “Try the upload again”.", retry: true });
      }
    },
    [tubId, onRead],
  );

  const choose = useCallback(
    (f: File | undefined) => {
      if (!f) return;
      const problem = checkFile(f, maxBytes);
      if (problem) {
        setPhase({ kind: "error", message: problem, retry: false });
        return;
      }
      setFile(f);
      setPreview((old) => {
        if (old) URL.revokeObjectURL(old);
        return URL.createObjectURL(f);
      });
      void upload(f);
    },
    [maxBytes, upload],
  );

  const { getRootProps, getInputProps, isDragActive } = useDropzone({
    multiple: false,
    noClick: false,
    onDrop: (accepted, rejected) => choose(accepted[0] ?? rejected[0]?.file),
  });

  const busy = phase.kind === "uploading" || phase.kind === "reading";
  const pct = phase.kind === "uploading" && phase.total ? Math.round((phase.loaded / phase.total) * 100) : 0;

  return (
    <div className="space-y-4">
      {!busy && (
        <>
          <label className="flex min-h-14 w-full cursor-pointer items-center justify-center gap-2 rounded-xl bg-well-700 px-5 text-lg font-bold text-white hover:bg-well-900">
            <span aria-hidden>📷</span> {file ? "Take a new photo" : "Take the photo"}
            <input
              ref={cameraRef}
              data-testid="camera-input"
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              onChange={(e) => {
                choose(e.target.files?.[0]);
                e.target.value = "";
              }}
            />
          </label>
          <div
            {...getRootProps({
              className: cx(
                "hidden cursor-pointer rounded-xl border-2 border-dashed p-6 text-center sm:block",
                isDragActive ? "border-well-500 bg-well-50" : "border-line bg-shell",
              ),
            })}
            data-testid="dropzone"
          >
            <input {...getInputProps()} data-testid="dropzone-input" />
            <p className="font-bold">{isDragActive ? "Drop the photo here" : "Or drag the photo here, or click to pick a file"}</p>
            <p className="text-sm text-ink-soft">JPEG, PNG or WebP, up to {mb(maxBytes)}</p>
          </div>
        </>
      )}

      {preview && (
        <img src={preview} alt="The strip photo you chose" className="mx-auto max-h-56 rounded-xl border border-line object-contain" />
      )}

      {phase.kind === "uploading" && (
        <div className="space-y-2" data-testid="upload-progress">
          <p className="font-bold">Sending the photo… {pct}%</p>
          <div className="h-4 w-full overflow-hidden rounded-full bg-well-100" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} aria-label="Upload progress">
            <div className="h-full rounded-full bg-well-700 transition-[width]" style={{ width: `${pct}%` }} />
          </div>
          <p className="text-sm text-ink-soft">
            {mb(phase.loaded)} of {mb(phase.total)}. Keep this page open.
          </p>
        </div>
      )}
      {phase.kind === "reading" && (
        <Notice>
          <span className="inline-block animate-pulse">Reading the pads…</span> this takes a few seconds.
        </Notice>
      )}
      {phase.kind === "error" && (
        <div className="space-y-3">
          <Notice tone="alert">{phase.message}</Notice>
          {phase.retry && file && (
            <Button type="button" onClick={() => void upload(file)} className="w-full sm:w-auto">
              Try the upload again
            </Button>
          )}
        </div>
      )}
    </div>
  );
}
