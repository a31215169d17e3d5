// Choosing the strip photo (take one with the camera, or choose one already taken; drag and drop on
// a desktop), the upload straight to storage through a presigned PUT with a real progress bar, a
// stall timeout, Cancel and "Try the upload again", then the registration. The checks and words
// are those of the shared photo rules (features/photos/rules.ts); the server checks again.
import { useCallback, useEffect, useRef, useState } from "react";
import { useDropzone } from "react-dropzone";
import { Button, Notice, cx } from "~/components/ui";
import { formatMb as mb, PHOTO_ACCEPT, photoProblem } from "~/features/photos/rules";
import { UploadProgress } from "~/components/photos/UploadProgress";
import { postJson, sendPhoto, STOPPED_WORDS, UploadRefused, UploadStopped } from "~/components/photos/send-photo";

/** The registration answers within this, or the owner is told to try again. */
const REGISTER_TIMEOUT_MS = 60_000;

type Phase =
  | { kind: "idle" }
  | { kind: "uploading"; loaded: number; total: number }
  | { kind: "registering" }
  | { kind: "error"; message: string; retry: boolean };

export function checkFile(file: File, maxBytes: number): string | null {
  const problem = photoProblem(file.type, file.size, maxBytes);
  return problem ? (problem.code === "wrong_type" ? `“${file.name}”: ${problem.message}` : problem.message) : null;
}

export function PhotoUpload({ tubId, maxBytes, onRead }: { tubId: string; maxBytes: number; onRead: (readingId: string, duplicate: boolean) => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [preview, setPreview] = useState<string | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const abortRef = useRef<AbortController | null>(null);
  const statusRef = useRef<HTMLDivElement>(null);

  useEffect(() => () => abortRef.current?.abort(), []);
  // Keep the progress (or the error) in view on a phone, below the photo tips.
  useEffect(() => {
    if (phase.kind !== "idle") statusRef.current?.scrollIntoView({ block: "center", behavior: "smooth" });
  }, [phase.kind]);

  const upload = useCallback(
    async (f: File) => {
      abortRef.current?.abort();
      const abort = new AbortController();
      abortRef.current = abort;
      setPhase({ kind: "uploading", loaded: 0, total: f.size });
      try {
        const key = await sendPhoto(`/api/tubs/${tubId}/uploads`, f, (loaded, total) => setPhase({ kind: "uploading", loaded, total }), abort.signal);
        setPhase({ kind: "registering" });
        const timer = setTimeout(() => abort.abort(), REGISTER_TIMEOUT_MS);
        const reg = await postJson(`/api/tubs/${tubId}/photos`, { key }, abort.signal).finally(() => clearTimeout(timer));
        if (reg.status >= 200 && reg.status < 300) {
          onRead(String(reg.json.readingId), Boolean(reg.json.duplicate));
          return;
        }
        setPhase({ kind: "error", message: String(reg.json.message ?? "The photo could not be registered. Try again."), retry: reg.status === 409 || reg.status >= 500 });
      } catch (error) {
        if (error instanceof UploadRefused) {
          setPhase({ kind: "error", message: error.message, retry: error.retry });
          return;
        }
        if (error instanceof UploadStopped) {
          setPhase({ kind: "error", message: STOPPED_WORDS[error.why], retry: true });
          return;
        }
        setPhase({
          kind: "error",
          message: abort.signal.aborted
            ? "Dipwell did not answer in time. Your photo is still here: press “Try the upload again”."
            : "Dipwell could not be reached. Check your connection, then press “Try the upload again”.",
          retry: true,
        });
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

  const busy = phase.kind === "uploading" || phase.kind === "registering";
  const pick = (testId: string, capture: boolean, label: string, primary: boolean) => (
    <label
      className={cx(
        "flex min-h-14 w-full cursor-pointer items-center justify-center gap-2 rounded-xl px-5 text-lg font-bold focus-within:outline focus-within:outline-4 focus-within:outline-offset-2 focus-within:outline-well-500",
        primary ? "bg-well-700 text-white hover:bg-well-900" : "border-2 border-well-700 bg-white text-well-900 hover:bg-well-50",
      )}
    >
      <span aria-hidden>{capture ? "📷" : "🖼"}</span> {label}
      <input
        data-testid={testId}
        type="file"
        accept={PHOTO_ACCEPT}
        {...(capture ? { capture: "environment" as const } : {})}
        className="sr-only"
        onChange={(e) => {
          choose(e.target.files?.[0]);
          e.target.value = "";
        }}
      />
    </label>
  );

  return (
    <div className="space-y-4">
      {!busy && (
        <>
          <div className="grid gap-3 sm:grid-cols-2">
            {pick("camera-input", true, file ? "Retake the photo" : "Take a photo", true)}
            {pick("gallery-input", false, "Choose a photo", false)}
          </div>
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
            <p className="font-bold">{isDragActive ? "Drop the photo here" : "Or drag the photo here"}</p>
            <p className="text-sm text-ink-soft">JPEG, PNG or WebP, up to {mb(maxBytes)}</p>
          </div>
        </>
      )}

      <div ref={statusRef} className="space-y-4">
        {phase.kind === "uploading" && <UploadProgress loaded={phase.loaded} total={phase.total} onCancel={() => abortRef.current?.abort()} />}
        {phase.kind === "registering" && (
          <Notice>
            <span role="status" className="inline-block animate-pulse">Photo sent; handing it to the reader…</span>
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

      {preview && (
        <img src={preview} alt="The strip photo you chose" className="mx-auto max-h-56 rounded-xl border border-line object-contain" />
      )}
    </div>
  );
}
