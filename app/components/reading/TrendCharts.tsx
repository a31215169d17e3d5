// One chart per parameter over a true time axis: straight lines between the readings (no
// smoothing), the tub's target band shaded, each point marked in range / low / high (shape and
// words, not colour alone), unconfirmed points hollow, and numbered treatment markers.
import { useQuery } from "@tanstack/react-query";
import { CartesianGrid, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { StatusBadge, STATUS_WORDS, UnconfirmedMark } from "~/components/status";
import { formatDateTime, formatTick, useDateSettings } from "~/lib/dates";
import { ButtonLink, Card, EmptyState, Notice } from "~/components/ui";
import { rangeStatus, type RangeStatus } from "~/lib/range-status";
import { timeTicks, valueTicks } from "./trend-scale";

export type TrendData = {
  tub: { id: string; name: string };
  parameters: { analyte: string; label: string; unit: string; target: { min: number; max: number } | null; points: { t: number; value: number; readingId: string; confirmed: boolean }[] }[];
  treatments: { t: number; label: string; parameter: string | null }[];
};

export async function fetchTrends(tubId: string, days?: number): Promise<TrendData> {
  const res = await fetch(`/api/tubs/${tubId}/trends${days ? `?days=${days}` : ""}`, { headers: { accept: "application/json" } });
  if (res.status === 401) throw new Error("You are signed out. Sign in again to see the trends.");
  if (!res.ok) throw new Error("The trends could not be loaded. Check your connection and reload the page.");
  return (await res.json()) as TrendData;
}

const COLOURS: Record<RangeStatus, string> = { in: "#246b41", low: "#9a5b00", high: "#b3261e", unknown: "#0f5c54" };

/** A point's mark: a dot in range, a triangle pointing up for high and down for low; hollow until confirmed. */
function PointMark({ cx, cy, status, confirmed }: { cx: number; cy: number; status: RangeStatus; confirmed: boolean }) {
  const c = COLOURS[status];
  const fill = confirmed ? c : "#ffffff";
  if (status === "high") return <path d={`M${cx} ${cy - 7}L${cx + 6.5} ${cy + 5}H${cx - 6.5}Z`} fill={fill} stroke={c} strokeWidth={2} />;
  if (status === "low") return <path d={`M${cx} ${cy + 7}L${cx + 6.5} ${cy - 5}H${cx - 6.5}Z`} fill={fill} stroke={c} strokeWidth={2} />;
  return <circle cx={cx} cy={cy} r={4.5} fill={fill} stroke={c} strokeWidth={2} />;
}

function TreatmentFlag({ viewBox, n }: { viewBox?: { x?: number; y?: number }; n: number }) {
  const x = viewBox?.x ?? 0;
  const y = (viewBox?.y ?? 0) + 9;
  return (
    <g>
      <circle cx={x} cy={y} r={8} fill="#fdf1dc" stroke="#9a5b00" strokeWidth={1.5} />
      <text x={x} y={y + 3.5} textAnchor="middle" fontSize={10} fontWeight={700} fill="#6e4100">{n}</text>
    </g>
  );
}

export function TrendCharts({ tubId, timeZone, days }: { tubId: string; timeZone: string; days?: number }) {
  const q = useQuery({ queryKey: ["trends", tubId, days ?? null], queryFn: () => fetchTrends(tubId, days) });
  const { locale } = useDateSettings();
  if (q.isPending) {
    return (
      <div className="space-y-4" aria-busy="true" data-testid="trends-loading">
        {[0, 1].map((i) => (
          <Card key={i} className="h-64 animate-pulse bg-well-50" />
        ))}
        <p className="text-ink-soft">Loading the trends…</p>
      </div>
    );
  }
  if (q.isError) {
    return (
      <Notice tone="alert">
        {q.error.message}{" "}
        <button type="button" className="font-bold underline" onClick={() => void q.refetch()}>
          Try again
        </button>
      </Notice>
    );
  }
  const { parameters, treatments } = q.data;
  if (parameters.length === 0) {
    return (
      <EmptyState title="No values to chart yet" action={<ButtonLink href={`/tubs/${tubId}/read`}>Take a reading</ButtonLink>}>
        Each reading adds a point here, so you can see how the water changes between treatments.
      </EmptyState>
    );
  }
  const all = parameters.flatMap((p) => p.points.map((x) => x.t)).concat(treatments.map((t) => t.t));
  const hour = 3600 * 1000;
  const lo = Math.min(...all), hi = Math.max(...all);
  const pad = Math.max((hi - lo) * 0.04, 2 * hour);
  const domain: [number, number] = [lo - pad, hi + pad];
  const xt = timeTicks(domain[0], domain[1], timeZone);
  // Rendered in the browser only (the data come after hydration), through the app's one formatter.
  const tickFmt = (t: number) => formatTick(t, locale, timeZone, xt.unit === "hour" ? "hour" : xt.unit === "day" ? "day" : "month");
  const fullFmt = (t: number) => formatDateTime(t, locale, timeZone);
  const numbered = treatments.map((t, i) => ({ ...t, n: i + 1 }));
  return (
    <div className="space-y-4" data-testid="trend-charts">
      <Card className="py-3 text-sm" data-testid="trend-key">
        <p className="font-bold">How to read the charts</p>
        <ul className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-ink-soft">
          <li className="flex items-center gap-1.5"><svg width="16" height="16" aria-hidden="true"><PointMark cx={8} cy={8} status="in" confirmed /></svg> in range</li>
          <li className="flex items-center gap-1.5"><svg width="16" height="16" aria-hidden="true"><PointMark cx={8} cy={9} status="high" confirmed /></svg> high</li>
          <li className="flex items-center gap-1.5"><svg width="16" height="16" aria-hidden="true"><PointMark cx={8} cy={7} status="low" confirmed /></svg> low</li>
          <li className="flex items-center gap-1.5"><svg width="16" height="16" aria-hidden="true"><PointMark cx={8} cy={8} status="unknown" confirmed={false} /></svg> hollow: not confirmed yet</li>
          <li className="flex items-center gap-1.5"><svg width="18" height="18" aria-hidden="true"><TreatmentFlag viewBox={{ x: 9, y: 0 }} n={1} /></svg> numbered treatment, listed below</li>
          <li>shaded band: the target range</li>
        </ul>
      </Card>
      {parameters.map((p) => {
        const values = p.points.map((x) => x.value);
        const low = Math.min(...values, ...(p.target ? [p.target.min] : []));
        const high = Math.max(...values, ...(p.target ? [p.target.max] : []));
        // A little headroom so a point on the band's edge or the top tick is never cut in half.
        const room = (high - low || Math.abs(high) || 1) * 0.06;
        const yt = valueTicks(p.analyte === "ph" ? low - room : Math.min(0, low), high + room);
        const points = p.points.map((x) => ({ ...x, status: rangeStatus(x.value, p.target) }));
        const off = points.filter((x) => x.status === "low" || x.status === "high").length;
        return (
          <Card key={p.analyte} data-testid={`trend-${p.analyte}`}>
            <h2 className="font-bold">
              {p.label} <span className="font-normal text-ink-soft">{p.unit}</span>
            </h2>
            <p className="text-sm text-ink-soft">
              {p.target ? `Target ${p.target.min}–${p.target.max}. ` : ""}
              {points.length} reading{points.length === 1 ? "" : "s"}{p.target ? (off ? `, ${off} out of range` : ", all in range") : ""}.
            </p>
            <div className="mt-2 h-56" role="img" aria-label={`${p.label} over time: ${points.length} readings${p.target ? `, ${off} out of range` : ""}. The values are listed in the table under the chart.`}>
              <ResponsiveContainer width="100%" height="100%">
                <LineChart data={points} margin={{ top: 20, right: 12, bottom: 0, left: -12 }}>
                  <CartesianGrid stroke="#e4e1d8" strokeDasharray="3 3" />
                  <XAxis dataKey="t" type="number" scale="time" domain={domain} ticks={xt.ticks} tickFormatter={tickFmt} tick={{ fontSize: 12, fill: "#4a625e" }} allowDataOverflow />
                  <YAxis type="number" domain={yt.domain} ticks={yt.ticks} tickFormatter={(v: number) => v.toFixed(yt.decimals)} tick={{ fontSize: 12, fill: "#4a625e" }} allowDataOverflow interval={0} />
                  {p.target && <ReferenceArea y1={p.target.min} y2={p.target.max} fill="#246b41" fillOpacity={0.12} strokeOpacity={0} />}
                  {numbered.map((t) => (
                    <ReferenceLine key={t.n} x={t.t} stroke="#9a5b00" strokeDasharray="4 3" label={<TreatmentFlag n={t.n} />} />
                  ))}
                  <Tooltip
                    labelFormatter={(t) => fullFmt(Number(t))}
                    formatter={(v, _n, item) => {
                      const pt = item.payload as (typeof points)[number];
                      return [`${v} ${p.unit} · ${STATUS_WORDS[pt.status]}${pt.confirmed ? "" : " · not confirmed"}`, p.label];
                    }}
                  />
                  <Line
                    type="linear"
                    dataKey="value"
                    stroke="#0f5c54"
                    strokeWidth={2}
                    isAnimationActive={false}
                    dot={(props: { cx?: number; cy?: number; index?: number; payload?: (typeof points)[number] }) => (
                      <PointMark key={props.index} cx={props.cx ?? 0} cy={props.cy ?? 0} status={props.payload?.status ?? "unknown"} confirmed={props.payload?.confirmed ?? true} />
                    )}
                    activeDot={{ r: 6 }}
                  />
                </LineChart>
              </ResponsiveContainer>
            </div>
            <details className="mt-2 text-sm">
              <summary className="cursor-pointer font-bold text-well-700">Values as a table</summary>
              <table className="mt-2 w-full text-left">
                <thead className="text-ink-soft">
                  <tr><th className="py-1">When</th><th>Value</th><th>Status</th></tr>
                </thead>
                <tbody className="divide-y divide-line">
                  {[...points].reverse().map((x) => (
                    <tr key={`${x.readingId}-${x.t}`} data-testid="trend-row">
                      <td className="py-1.5">{fullFmt(x.t)}</td>
                      <td>{x.value} {p.unit}</td>
                      <td className="flex flex-wrap gap-1 py-1"><StatusBadge status={x.status} />{!x.confirmed && <UnconfirmedMark />}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </details>
          </Card>
        );
      })}
      {numbered.length > 0 && (
        <Card>
          <h2 className="mb-1 font-bold">Treatments</h2>
          <ol className="space-y-1 text-sm" data-testid="trend-treatments">
            {numbered.map((t) => (
              <li key={t.n} className="flex gap-2">
                <span className="grid size-6 shrink-0 place-items-center rounded-full border border-caution bg-caution-soft text-xs font-bold text-caution" aria-hidden="true">{t.n}</span>
                <span><span className="sr-only">Marker {t.n}: </span>{fullFmt(t.t)} · {t.label}</span>
              </li>
            ))}
          </ol>
        </Card>
      )}
    </div>
  );
}
