// When the strip came out of the water, kept per tub in the tab's sessionStorage, so the
// 15-second wait survives the Back button, a reload or the phone locking: the page works out
// where the owner is from the time the strip was dipped, not from how long it has been open.

/** Colours keep changing after the wait; past this, the strip is too old to photograph. */
export const STRIP_FRESH_SECONDS = 120;

const key = (tubId: string) => `dipwell:dipped:${tubId}`;

function storage(): Storage | null {
  try {
    return typeof window === "undefined" ? null : window.sessionStorage;
  } catch {
    return null; // storage switched off: the timer still runs, it just does not survive a reload
  }
}

export function rememberDip(tubId: string, at = Date.now()) {
  try {
    storage()?.setItem(key(tubId), String(at));
  } catch {
    // storage full or refused: nothing to do
  }
}

export function forgetDip(tubId: string) {
  try {
    storage()?.removeItem(key(tubId));
  } catch {
    // nothing to forget
  }
}

/** The time the strip was dipped, if this tab remembers one that is not in the future. */
export function dippedAt(tubId: string, now = Date.now()): number | null {
  const raw = storage()?.getItem(key(tubId));
  const at = raw ? Number(raw) : NaN;
  return Number.isFinite(at) && at <= now + 1000 ? at : null;
}

export type DipState = { step: "prepare"; stale: boolean } | { step: "countdown"; startedAt: number } | { step: "photo" };

/** Where a remembered dip puts the owner now. */
export function dipState(at: number | null, waitSeconds: number, now = Date.now()): DipState {
  if (at === null) return { step: "prepare", stale: false };
  const elapsed = (now - at) / 1000;
  if (elapsed < waitSeconds) return { step: "countdown", startedAt: at };
  if (elapsed < STRIP_FRESH_SECONDS) return { step: "photo" };
  return { step: "prepare", stale: true };
}
