// The upload's progress bar with its figures and a Cancel button (every photo upload shows the same).
import { Button } from "~/components/ui";
import { formatMb } from "~/features/photos/rules";

export function UploadProgress({ loaded, total, onCancel, testId = "upload-progress" }: { loaded: number; total: number; onCancel: () => void; testId?: string }) {
  const pct = total ? Math.round((loaded / total) * 100) : 0;
  return (
    <div className="space-y-2" data-testid={testId}>
      <p className="font-bold" role="status">Sending the photo… {pct}%</p>
      <div className="h-4 w-full overflow-hidden rounded-full bg-well-100" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} aria-label="Upload progress">
        <div className="h-full rounded-full bg-well-700 transition-[width]" style={{ width: `${pct}%` }} />
      </div>
      <p className="text-sm text-ink-soft">
        {formatMb(loaded)} of {formatMb(total)}. Keep this page open.
      </p>
      <Button type="button" variant="secondary" onClick={onCancel} className="w-full sm:w-auto">
        Cancel the upload
      </Button>
    </div>
  );
}
