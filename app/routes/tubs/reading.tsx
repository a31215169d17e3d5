// Review: each pad's crop beside the chart's swatches, the read value and how sure the reader is.
// The owner confirms, taps the right swatch or types a value; a failed read is entered by hand here.
import { QueryClient, QueryClientProvider, useQuery } from "@tanstack/react-query";
import { useEffect, useState } from "react";
import { data, Form, redirect, useNavigation, useRevalidator } from "react-router";
import { BackLink, Button, ButtonLink, Card, Notice, PageTitle, cx, inputClass } from "~/components/ui";
import { SwatchColours } from "~/components/reading/SwatchColours";
import { confirmReading, loadReview } from "~/features/readings/readings.server";
import { tubGuard } from "~/lib/tub-access.server";
import { timeWords } from "~/lib/dates";
import { AHEAD_SHOWN_UP_TO, readingPollDelay } from "~/features/readings/status-poll";
import type { Route } from "./+types/reading";

export const meta: Route.MetaFunction = () => [{ title: "Check the reading · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const review = await loadReview(tub, params.readingId);
  if (!review) throw data({ message: "We could not find that reading." }, { status: 404 });
  const url = new URL(request.url);
  return {
    tub: { id: tub.id, name: tub.name, timeZone: tub.timeZone },
    when: timeWords(request).tub(review.reading.takenAt, tub.timeZone),
    duplicate: url.searchParams.has("duplicate"),
    justConfirmed: url.searchParams.has("confirmed"),
    ...review,
  };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "care");
  const form = await request.formData();
  const result = await confirmReading(user, tub, params.readingId, form);
  if (!result.ok) {
    if ("notFound" in result && result.notFound) throw data({ message: "We could not find that reading." }, { status: 404 });
    return data({ fields: result.fields, form: result.form }, { status: 400 });
  }
  return redirect(`/tubs/${tub.id}/readings/${params.readingId}?confirmed=1`);
}

const confidenceWords = (c: number | null) => (c === null ? "" : c >= 0.8 ? "sure" : c >= 0.6 ? "fairly sure" : "unsure");

export default function ReviewReading(props: Route.ComponentProps) {
  if (props.loaderData.reading.status === "pending") return <WaitForReading tubId={props.loaderData.tub.id} tubName={props.loaderData.tub.name} readingId={props.loaderData.reading.id} photoId={props.loaderData.reading.photoId} />;
  return <Review {...props} />;
}

type ReadingState = { status: string; stage: "queued" | "reading" | "retrying" | "done"; ahead: number };

/** While the worker reads the photo: the photo, where the reading stands, and the review once it is ready. */
function WaitForReading(props: { tubId: string; tubName: string; readingId: string; photoId: string | null }) {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { retry: 3 } } }));
  return (
    <QueryClientProvider client={client}>
      <ReadingProgress {...props} />
    </QueryClientProvider>
  );
}

function ReadingProgress({ tubId, tubName, readingId, photoId }: { tubId: string; tubName: string; readingId: string; photoId: string | null }) {
  const revalidator = useRevalidator();
  const [started] = useState(() => Date.now());
  const q = useQuery({
    queryKey: ["reading-status", tubId, readingId],
    queryFn: async (): Promise<ReadingState> => {
      const res = await fetch(`/api/tubs/${tubId}/readings/${readingId}`, { headers: { accept: "application/json" } });
      if (!res.ok) throw new Error(String(res.status));
      return res.json();
    },
    // Once a second at first, then less often while the reading waits its turn behind other photos.
    refetchInterval: (query) =>
      query.state.data && query.state.data.status !== "pending" ? false : readingPollDelay(query.state.dataUpdateCount + query.state.errorUpdateCount),
  });
  const done = q.data && q.data.status !== "pending";
  useEffect(() => {
    if (done && revalidator.state === "idle") void revalidator.revalidate();
  }, [done, revalidator]);
  const stage = q.data?.stage ?? "queued";
  const steps = [
    { key: "queued", label: "Photo received and kept" },
    { key: "reading", label: "Finding the strip and reading each pad" },
    { key: "done", label: "Ready for you to check" },
  ];
  const at = done ? 2 : stage === "reading" || stage === "retrying" ? 1 : 0;
  const slow = Date.now() - started > 30_000;
  return (
    <div className="mx-auto max-w-2xl space-y-5">
      <BackLink href={`/tubs/${tubId}`}>{tubName}</BackLink>
      <PageTitle sub="Your photo is safe: Dipwell has it.">Reading your strip</PageTitle>
      <Card className="space-y-4" data-testid="reading-progress">
        <div role="status" aria-live="polite" className="font-bold">
          {done
            ? "Ready: opening the reading…"
            : stage === "reading"
              ? "Reading the pads…"
              : stage === "retrying"
                ? "The first try did not finish; Dipwell is reading it again…"
                : q.data?.ahead
                  ? q.data.ahead >= AHEAD_SHOWN_UP_TO
                    ? `Waiting its turn: ${AHEAD_SHOWN_UP_TO} or more photos ahead.`
                    : `Waiting its turn: ${q.data.ahead} photo${q.data.ahead > 1 ? "s" : ""} ahead.`
                  : "Waiting its turn…"}
        </div>
        <div className="h-3 w-full overflow-hidden rounded-full bg-well-100" role="progressbar" aria-label="Reading progress" aria-valuemin={0} aria-valuemax={2} aria-valuenow={at}>
          <div className="h-full rounded-full bg-well-700 transition-[width]" style={{ width: `${[20, 60, 100][at]}%` }} />
        </div>
        <ol className="space-y-1 text-sm">
          {steps.map((st, i) => (
            <li key={st.key} className={cx(i <= at ? "font-bold text-ink" : "text-ink-soft")}>
              {i < at || done ? "✓" : i === at ? "…" : "·"} {st.label}
            </li>
          ))}
        </ol>
        {q.isError && <Notice tone="caution">Dipwell could not check on the reading just now; it keeps trying. Your photo is kept.</Notice>}
        {slow && !done && <p className="text-sm text-ink-soft">This is taking longer than usual. You can leave this page: the reading will be in the tub's history when it is ready.</p>}
      </Card>
      {photoId && <img src={`/tubs/${tubId}/photos/${photoId}`} alt="Your strip photo" className="mx-auto max-h-48 rounded-xl border border-line object-contain" />}
    </div>
  );
}

function Review({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, reading, pads, duplicate, justConfirmed } = loaderData;
  const nav = useNavigation();
  const [values, setValues] = useState<Record<string, string>>(() =>
    Object.fromEntries(pads.map((p) => [p.analyte, p.confirmedValue !== null ? String(p.confirmedValue) : p.readValue !== null ? String(p.readValue) : ""])),
  );
  const failed = reading.status === "failed";
  const confirmed = reading.status === "confirmed";
  const when = loaderData.when;
  const unsure = pads.filter((p) => p.needsReview && p.readValue !== null).length;

  return (
    <div className="mx-auto max-w-2xl space-y-5">
      <BackLink href={`/tubs/${tub.id}`}>{tub.name}</BackLink>
      <PageTitle sub={when}>{confirmed ? "Reading" : failed ? "Enter the values" : "Check the reading"}</PageTitle>
      {duplicate && <Notice>You sent this photo before, so here is the reading Dipwell already made from it. Nothing was added twice.</Notice>}
      {justConfirmed && (
        <Notice tone="ok">
          <p className="font-bold">Saved. Thank you for checking.</p>
          <a href={`/tubs/${tub.id}/plan`} className="mt-1 inline-block font-bold">See the next safe step →</a>
        </Notice>
      )}
      {failed && (
        <Notice tone="caution">
          <p className="font-bold">Dipwell could not read this photo.</p>
          <p>{reading.error}</p>
          <p className="mt-1">Your photo is kept. Compare the strip with the colours below and tap the closest one, or take a new photo.</p>
          <ButtonLink variant="secondary" className="mt-2" href={`/tubs/${tub.id}/read?retake=1`}>Retake the photo</ButtonLink>
        </Notice>
      )}
      {!failed && !confirmed && (
        <Notice tone={unsure ? "caution" : "info"}>
          {unsure
            ? `Dipwell is unsure of ${unsure} pad${unsure > 1 ? "s" : ""} (marked below). Compare with your strip and tap the colour that matches.`
            : "Compare each pad with your strip. If one looks wrong, tap the colour that matches or type the value."}
        </Notice>
      )}
      {reading.warnings.length > 0 && <Notice tone="caution">{reading.warnings.join(" ")}</Notice>}
      {reading.photoId && (
        <img src={`/tubs/${tub.id}/photos/${reading.photoId}`} alt="Your strip photo" className="mx-auto max-h-48 rounded-xl border border-line object-contain" />
      )}
      {actionData?.form && <Notice tone="alert">{actionData.form}</Notice>}

      <Form method="post" className="space-y-4">
        <input type="hidden" name="intent" value="confirm" />
        {pads.map((p) => {
          const chosen = values[p.analyte] ?? "";
          const err = actionData?.fields?.[p.analyte];
          return (
            <Card key={p.analyte} className={cx("space-y-3", p.needsReview && p.readValue !== null && !confirmed && "border-caution")} data-testid={`pad-${p.analyte}`}>
              <div className="flex flex-wrap items-start gap-3">
                {p.hasCrop && reading.photoId ? (
                  p.padCount > 1 ? (
                    <img src={`/tubs/${tub.id}/readings/${reading.id}/crops/${p.analyte}`} alt={`${p.label} pads as photographed, side by side`} width={56 * p.padCount} height={56} className="h-14 w-auto max-w-full rounded-lg border border-line" />
                  ) : (
                    <img src={`/tubs/${tub.id}/readings/${reading.id}/crops/${p.analyte}`} alt={`${p.label} pad as photographed`} width={64} height={64} className="size-16 rounded-lg border border-line" />
                  )
                ) : (
                  <div className="grid size-16 place-items-center rounded-lg border border-dashed border-line text-xs text-ink-soft">no crop</div>
                )}
                <div className="min-w-48 flex-1">
                  <h2 className="text-lg font-bold">{p.label}</h2>
                  {p.padCount > 1 && <p className="text-sm text-ink-soft">One reading from {p.padCount} pads, read together</p>}
                  {p.readValue !== null ? (
                    <p className="text-ink-soft">
                      Read as <strong className="text-ink" data-testid="read-value">{p.readValue} {p.unit}</strong>
                      {p.confidence !== null && <> · {confidenceWords(p.confidence)} ({Math.round(p.confidence * 100)}%)</>}
                    </p>
                  ) : (
                    <p className="text-ink-soft">Not read: choose the colour or type the value.</p>
                  )}
                  {p.needsReview && p.readValue !== null && !confirmed && (
                    <p className="text-sm font-bold text-caution" data-testid="unsure">⚠ Please check: {p.reason?.replace(/^Please check [^:]+: /, "") ?? "the reader is unsure"}</p>
                  )}
                  {p.target && <p className="text-sm text-ink-soft">Target {p.target.min}–{p.target.max} {p.unit}</p>}
                </div>
              </div>
              {p.swatches.length > 0 && (
                <div className="flex flex-wrap gap-2" role="group" aria-label={`${p.label} chart colours`}>
                  {p.swatches.map((s) => {
                    const selected = chosen !== "" && Number(chosen) === s.value;
                    return (
                      <button
                        key={s.value}
                        type="button"
                        disabled={confirmed}
                        onClick={() => setValues((v) => ({ ...v, [p.analyte]: String(s.value) }))}
                        aria-pressed={selected}
                        aria-label={`${p.label} ${s.value}`}
                        className={cx("flex flex-col items-center rounded-lg border-2 p-1 text-xs", p.padCount > 1 ? "w-16" : "w-12", selected ? "border-well-900" : "border-transparent")}
                      >
                        <SwatchColours colors={s.colors} className={p.padCount > 1 ? "h-9 w-14" : "size-9"} />
                        <span className="mt-0.5 font-bold">{s.value}</span>
                      </button>
                    );
                  })}
                </div>
              )}
              <label className="flex items-center gap-2">
                <span className="font-bold">Value</span>
                <input
                  name={`typed:${p.analyte}`}
                  inputMode="decimal"
                  value={chosen}
                  readOnly={confirmed}
                  onChange={(e) => setValues((v) => ({ ...v, [p.analyte]: e.target.value }))}
                  className={cx(inputClass, "max-w-32")}
                  aria-label={`${p.label} value`}
                />
                <span className="text-ink-soft">{p.unit}</span>
                {p.source && p.source !== "auto" && <span className="text-sm text-ink-soft">({p.source})</span>}
              </label>
              {err && <p role="alert" className="text-sm font-bold text-alert">{err}</p>}
            </Card>
          );
        })}
        {confirmed ? (
          <p className="text-ink-soft">Confirmed{reading.confirmedBy ? ` by ${reading.confirmedBy}` : ""}. <a href={`/tubs/${tub.id}/plan`}>See the next safe step</a></p>
        ) : (
          <Button type="submit" className="w-full" disabled={nav.state === "submitting"}>
            {nav.state === "submitting" ? "Saving…" : failed ? "Save these values" : "Confirm the values"}
          </Button>
        )}
      </Form>
      <div className="flex flex-wrap gap-3">
        <ButtonLink variant="secondary" href={`/tubs/${tub.id}/history`}>History</ButtonLink>
        <ButtonLink variant="secondary" href={`/tubs/${tub.id}/trends`}>Trends</ButtonLink>
      </div>
    </div>
  );
}
