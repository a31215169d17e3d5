// A countdown that ends with a short beep (Web Audio) and a vibration where the device allows.
import { useCallback, useEffect, useRef, useState } from "react";

export function beep() {
  try {
    const AudioCtx = window.AudioContext ?? (window as unknown as { webkitAudioContext?: typeof AudioContext }).webkitAudioContext;
    if (AudioCtx) {
      const ctx = new AudioCtx();
      for (const [i, f] of [880, 1320].entries()) {
        const osc = ctx.createOscillator();
        const gain = ctx.createGain();
        osc.frequency.value = f;
        osc.type = "sine";
        gain.gain.setValueAtTime(0.0001, ctx.currentTime + i * 0.25);
        gain.gain.exponentialRampToValueAtTime(0.3, ctx.currentTime + i * 0.25 + 0.02);
        gain.gain.exponentialRampToValueAtTime(0.0001, ctx.currentTime + i * 0.25 + 0.22);
        osc.connect(gain).connect(ctx.destination);
        osc.start(ctx.currentTime + i * 0.25);
        osc.stop(ctx.currentTime + i * 0.25 + 0.24);
      }
      setTimeout(() => void ctx.close().catch(() => {}), 1000);
    }
  } catch {
    // no sound on this device; the screen still says so
  }
  try {
    navigator.vibrate?.([200, 100, 200]);
  } catch {
    // no vibration on this device
  }
}

/** Counts down from `startedAt` (a wall-clock time), so a countdown resumed after a reload ends on time. */
export function Countdown({ seconds, startedAt, onDone }: { seconds: number; startedAt: number; onDone: () => void }) {
  const remainingAt = useCallback((now: number) => Math.max(0, seconds - Math.floor((now - startedAt) / 1000)), [seconds, startedAt]);
  const [left, setLeft] = useState(() => remainingAt(Date.now()));
  const done = useRef(false);
  useEffect(() => {
    const tick = () => {
      const remaining = remainingAt(Date.now());
      setLeft(remaining);
      if (remaining === 0 && !done.current) {
        done.current = true;
        clearInterval(id);
        beep();
        onDone();
      }
    };
    const id = setInterval(tick, 200);
    tick();
    return () => clearInterval(id);
  }, [remainingAt, onDone]);
  const pct = ((seconds - left) / seconds) * 100;
  return (
    <div className="flex flex-col items-center gap-3" role="timer" aria-label={`${left} seconds left`} data-testid="countdown">
      <div
        className="grid size-44 place-items-center rounded-full"
        style={{ background: `conic-gradient(var(--color-well-700) ${pct}%, var(--color-well-100) 0)` }}
      >
        <div className="grid size-36 place-items-center rounded-full bg-shell">
          <span className="text-5xl font-bold tabular-nums text-well-900">{left}</span>
        </div>
      </div>
      <p className="text-ink-soft">seconds left · hold the strip level, pads up</p>
    </div>
  );
}
