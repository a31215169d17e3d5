// A photo of a strip batch chosen on the calibration page (the printed chart card, or a strip
// dipped in a reference solution): checked in the browser by the shared photo rules, sent by the
// same presigned upload as every photo (progress bar, cancel, try again), then handed to `onSent`
// with its upload key. The server checks it again on its bytes.
import { useEffect, useRef, useState } from "react";
import { Button, Notice } from "~/components/ui";
import { UploadProgress } from "~/components/photos/UploadProgress";
import { sendPhoto, STOPPED_WORDS, UploadRefused, UploadStopped } from "~/components/photos/send-photo";
import { formatMb, PHOTO_ACCEPT, photoProblem } from "~/features/photos/rules";

type Phase =
  | { kind: "idle" }
  | { kind: "uploading"; loaded: number; total: number }
  | { kind: "registering" }
  | { kind: "sent"; name: string }
  | { kind: "error"; message: string; retry: boolean };

/** What `onSent` answers: null when the photo is in, or the refusal to show. */
export type SentResult = null | { message: string; retry: boolean };

export function BatchPhotoInput({
  batchId,
  maxBytes,
  label,
  testId,
  onSent,
  onCleared,
}: {
  batchId: string;
  maxBytes: number;
  label: string;
  testId: string;
  onSent: (key: string, signal: AbortSignal) => Promise<SentResult>;
  onCleared?: () => void;
}) {
  const [phase, setPhase] = useState<Phase>({ kind: "idle" });
  const [file, setFile] = useState<File | null>(null);
  const abortRef = useRef<AbortController | null>(null);
  useEffect(() => () => abortRef.current?.abort(), []);

  async function send(f: File) {
    abortRef.current?.abort();
    const abort = new AbortController();
    abortRef.current = abort;
    setPhase({ kind: "uploading", loaded: 0, total: f.size });
    try {
      const key = await sendPhoto(`/api/chart-batches/${batchId}/uploads`, f, (loaded, total) => setPhase({ kind: "uploading", loaded, total }), abort.signal);
      setPhase({ kind: "registering" });
      const refused = await onSent(key, abort.signal);
      setPhase(refused ? { kind: "error", ...refused } : { kind: "sent", name: f.name });
    } catch (error) {
      if (error instanceof UploadRefused) setPhase({ kind: "error", message: error.message, retry: error.retry });
      else if (error instanceof UploadStopped) setPhase({ kind: "error", message: STOPPED_WORDS[error.why], retry: true });
      else setPhase({ kind: "error", message: "Dipwell could not be reached. Check your connection, then press “Try the upload again”.", retry: true });
    }
  }

  function choose(f: File | undefined) {
    if (!f) return;
    onCleared?.();
    const problem = photoProblem(f.type, f.size, maxBytes);
    if (problem) {
      setFile(null);
      setPhase({ kind: "error", message: problem.code === "wrong_type" ? `“${f.name}”: ${problem.message}` : problem.message, retry: false });
      return;
    }
    setFile(f);
    void send(f);
  }

  const busy = phase.kind === "uploading" || phase.kind === "registering";
  return (
    <div className="space-y-2">
      {!busy && (
        <div>
          <label className="inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-lg border-2 border-well-700 bg-white px-4 font-bold text-well-900 hover:bg-well-50 focus-within:outline focus-within:outline-4 focus-within:outline-offset-2 focus-within:outline-well-500">
            {phase.kind === "sent" ? "Choose another photo" : "Choose a photo"}
            <input
              type="file"
              accept={PHOTO_ACCEPT}
              aria-label={label}
              data-testid={testId}
              className="sr-only"
              onChange={(e) => {
                choose(e.target.files?.[0]);
                e.target.value = "";
              }}
            />
          </label>
          <span className="mt-1 block text-xs text-ink-soft">JPEG, PNG or WebP, up to {formatMb(maxBytes)}</span>
        </div>
      )}
      {phase.kind === "uploading" && <UploadProgress loaded={phase.loaded} total={phase.total} onCancel={() => abortRef.current?.abort()} testId={`${testId}-progress`} />}
      {phase.kind === "registering" && <p role="status" className="text-sm">Photo sent; checking it…</p>}
      {phase.kind === "sent" && (
        <p role="status" className="text-sm font-bold text-ok" data-testid={`${testId}-sent`}>
          ✓ {phase.name} sent
        </p>
      )}
      {phase.kind === "error" && (
        <div className="space-y-2">
          <Notice tone="alert">{phase.message}</Notice>
          {phase.retry && file && (
            <Button type="button" variant="secondary" onClick={() => void send(file)}>
              Try the upload again
            </Button>
          )}
        </div>
      )}
    </div>
  );
}
