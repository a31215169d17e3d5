// Guided capture, phone first: run the jets, dip once, take it out, 15-second countdown,
// then how to photograph, the camera, the upload and the reading.
import { useCallback, useEffect, useRef, useState } from "react";
import { useNavigate } from "react-router";
import { Countdown } from "~/components/reading/Countdown";
import { dippedAt, dipState, forgetDip, rememberDip, STRIP_FRESH_SECONDS } from "~/components/reading/dip-clock";
import { PhotoUpload } from "~/components/reading/PhotoUpload";
import { BackLink, Button, ButtonLink, Card, Notice, PageTitle } from "~/components/ui";
import { maxPhotoBytes } from "~/features/readings/readings.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/read";

export const meta: Route.MetaFunction = () => [{ title: "New reading · Dipwell" }];

const WAIT_SECONDS = 15;

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub, relation } = await tubGuard({ context, request, params }, "care");
  return { tub: { id: tub.id, name: tub.name, hasBatch: Boolean(tub.batchId), archived: Boolean(tub.archivedAt) }, canEdit: relation !== "technician", maxBytes: maxPhotoBytes(), retake: new URL(request.url).searchParams.has("retake") };
}

type Step = "prepare" | "countdown" | "photo";

export default function NewReading({ loaderData }: Route.ComponentProps) {
  const { tub, maxBytes, canEdit, retake } = loaderData;
  // "Retake the photo" after a failed read goes straight to the photo step.
  const [step, setStep] = useState<Step>(retake ? "photo" : "prepare");
  const [startedAt, setStartedAt] = useState<number | null>(null);
  const [stale, setStale] = useState(false);
  // Focus follows the step the owner is on (not on the first render, where the page opened).
  const moved = useRef(false);
  const countdownHeading = useRef<HTMLHeadingElement>(null);
  const photoHeading = useRef<HTMLHeadingElement>(null);
  const navigate = useNavigate();

  // A strip dipped earlier in this tab (then Back, a reload, a locked phone): carry on from
  // when it came out of the water, not from the start.
  useEffect(() => {
    if (retake) return;
    const state = dipState(dippedAt(tub.id), WAIT_SECONDS);
    if (state.step === "countdown") setStartedAt(state.startedAt);
    // Back on a step further on: take the owner to it.
    if (state.step !== "prepare") moved.current = true;
    if (state.step === "prepare" && state.stale) {
      forgetDip(tub.id);
      setStale(true);
    }
    setStep(state.step);
  }, [retake, tub.id]);

  useEffect(() => {
    if (!moved.current) return;
    (step === "countdown" ? countdownHeading : step === "photo" ? photoHeading : null)?.current?.focus();
  }, [step]);

  const start = () => {
    const now = Date.now();
    rememberDip(tub.id, now);
    setStartedAt(now);
    setStale(false);
    moved.current = true;
    setStep("countdown");
  };
  const startOver = () => {
    forgetDip(tub.id);
    moved.current = true;
    setStep("prepare");
  };
  const onDone = useCallback(() => {
    moved.current = true;
    setStep("photo");
  }, []);
  const onRead = useCallback(
    (readingId: string, duplicate: boolean) => {
      forgetDip(tub.id);
      navigate(`/tubs/${tub.id}/readings/${readingId}${duplicate ? "?duplicate=1" : ""}`);
    },
    [navigate, tub.id],
  );

  return (
    <div className="mx-auto max-w-xl space-y-5">
      <BackLink href={`/tubs/${tub.id}`}>{tub.name}</BackLink>
      <PageTitle sub={tub.name}>New reading</PageTitle>
      {!tub.hasBatch ? (
        <Notice tone="caution">
          Dipwell needs to know which test strips you use before it can read them.{" "}
          {canEdit ? <a href={`/tubs/${tub.id}/edit`}>Choose your strips in the tub settings</a> : "Ask the tub's owner to choose them in the tub settings."}
        </Notice>
      ) : (
        <>
          <ol className="flex gap-2 text-sm font-bold" aria-label="Steps">
            {(["prepare", "countdown", "photo"] as Step[]).map((s, i) => (
              <li key={s} aria-current={step === s ? "step" : undefined} className={`flex-1 rounded-full px-3 py-1 text-center ${step === s ? "bg-well-700 text-white" : "bg-well-50 text-well-900"}`}>
                {i + 1}. {s === "prepare" ? "Dip" : s === "countdown" ? "Wait" : "Photo"}
              </li>
            ))}
          </ol>
          {step === "prepare" && (
            <Card className="space-y-4">
              {stale && <Notice tone="caution">The strip you dipped earlier has been out of the water for more than {STRIP_FRESH_SECONDS / 60} minutes, so its colours have moved on. Dip a new strip.</Notice>}
              <h2 className="text-xl font-bold">Dip the strip</h2>
              <ol className="list-decimal space-y-3 pl-6 text-lg">
                <li>Run the jets for a minute so the water is mixed, then turn them off.</li>
                <li>Dip one strip once, elbow-deep, for about a second. Do not swish it.</li>
                <li>Take it out, shake off the drops once, and hold it level with the pads up.</li>
              </ol>
              <Button className="w-full" onClick={start}>
                I've taken it out: start the {WAIT_SECONDS}-second timer
              </Button>
              <p className="text-sm text-ink-soft">The timer beeps and vibrates (where your phone allows) when the colours are ready.</p>
            </Card>
          )}
          {step === "countdown" && (
            <Card className="space-y-4">
              <h2 ref={countdownHeading} tabIndex={-1} className="text-xl font-bold outline-none">Let the colours develop</h2>
              <Countdown seconds={WAIT_SECONDS} startedAt={startedAt ?? Date.now()} onDone={onDone} />
              <p className="text-center text-sm text-ink-soft">Meanwhile, put a plain white sheet of paper somewhere bright. Going back or reloading the page does not stop the timer.</p>
              <Button variant="quiet" className="w-full" onClick={startOver}>
                Start again with a new strip
              </Button>
            </Card>
          )}
          {step === "photo" && (
            <Card className="space-y-4">
              {retake ? <Notice>Photograph the strip again: lay it flat in bright, even light. If more than a minute has passed since you dipped it, dip a new strip first.</Notice> : <Notice tone="ok">Time's up: photograph the strip now. Colours keep changing after a minute.</Notice>}
              <h2 ref={photoHeading} tabIndex={-1} className="text-xl font-bold outline-none">Photograph the strip</h2>
              <div className="grid grid-cols-[auto_1fr] items-center gap-4">
                <StripGuide />
                <ul className="list-disc space-y-2 pl-5">
                  <li>Lay the strip flat on a plain surface (white paper is best).</li>
                  <li>Use daylight or bright, even light; avoid shadows and glare.</li>
                  <li>Hold the phone straight above and fill the guide with the strip.</li>
                </ul>
              </div>
              <PhotoUpload tubId={tub.id} maxBytes={maxBytes} onRead={onRead} />
              <p className="text-sm text-ink-soft">
                Dipwell keeps every photo you send. No photo? <ButtonLink variant="quiet" className="min-h-0 px-0" href={`/tubs/${tub.id}/history`}>See earlier readings</ButtonLink>
              </p>
            </Card>
          )}
        </>
      )}
    </div>
  );
}

function StripGuide() {
  return (
    <svg viewBox="0 0 60 160" width="60" height="160" aria-label="Guide: the strip should fill the frame lengthwise" role="img">
      <rect x="2" y="2" width="56" height="156" rx="6" fill="none" stroke="var(--color-well-700)" strokeWidth="2" strokeDasharray="6 4" />
      <rect x="22" y="12" width="16" height="136" rx="2" fill="#f5f4ee" stroke="#bbb" />
      {[18, 36, 54].map((y, i) => (
        <rect key={y} x="23" y={y} width="14" height="12" fill={["#d2a3c9", "#e5813f", "#70a484"][i]} />
      ))}
    </svg>
  );
}
