// One chart per parameter over time, the tub's target band shaded, treatments marked on the time axis.
import { useQuery } from "@tanstack/react-query";
import { CartesianGrid, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { ButtonLink, Card, EmptyState, Notice } from "~/components/ui";

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

export function TrendCharts({ tubId, timeZone, days }: { tubId: string; timeZone: string; days?: number }) {
  const q = useQuery({ queryKey: ["trends", tubId, days ?? null], queryFn: () => fetchTrends(tubId, days) });
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
  const day = 24 * 3600 * 1000;
  const lo = Math.min(...all), hi = Math.max(...all);
  const domain: [number, number] = hi - lo < day ? [lo - day / 2, hi + day / 2] : [lo - (hi - lo) * 0.03, hi + (hi - lo) * 0.03];
  const dateFmt = (t: number) => new Date(t).toLocaleDateString("en-GB", { timeZone, day: "numeric", month: "short" });
  const fullFmt = (t: number) => new Date(t).toLocaleString("en-GB", { timeZone, dateStyle: "medium", timeStyle: "short" });
  return (
    <div className="space-y-4" data-testid="trend-charts">
      {treatments.length > 0 && <p className="text-sm text-ink-soft">Dashed lines mark treatments.</p>}
      {parameters.map((p) => {
        const values = p.points.map((x) => x.value);
        const yMax = Math.max(...values, p.target?.max ?? 0) * 1.15 || 1;
        const yMin = p.analyte === "ph" ? Math.min(6.4, ...values) : 0;
        return (
          <Card key={p.analyte} data-testid={`trend-${p.analyte}`}>
            <h2 className="font-bold">
              {p.label} <span className="font-normal text-ink-soft">{p.unit}</span>
            </h2>
            {p.target && <p className="text-sm text-ink-soft">Shaded: target {p.target.min}–{p.target.max}</p>}
            <div className="mt-2 h-52">
              <ResponsiveContainer width="100%" height="100%">
                <LineChart data={p.points} margin={{ top: 8, right: 8, bottom: 0, left: -16 }}>
                  <CartesianGrid stroke="#e4e1d8" strokeDasharray="3 3" />
                  <XAxis dataKey="t" type="number" scale="time" domain={domain} tickFormatter={dateFmt} tick={{ fontSize: 12 }} />
                  <YAxis domain={[Math.floor(yMin * 10) / 10, Math.ceil(yMax * 10) / 10]} tick={{ fontSize: 12 }} />
                  {p.target && <ReferenceArea y1={p.target.min} y2={p.target.max} fill="#2f8f5b" fillOpacity={0.14} strokeOpacity={0} ifOverflow="extendDomain" />}
                  {treatments.map((t, i) => (
                    <ReferenceLine key={i} x={t.t} stroke="#a1620e" strokeDasharray="4 3" label={{ value: "▼", position: "insideTop", fill: "#a1620e", fontSize: 10 }} />
                  ))}
                  <Tooltip labelFormatter={(t) => fullFmt(Number(t))} formatter={(v) => [`${v} ${p.unit}`, p.label]} />
                  <Line type="monotone" dataKey="value" stroke="#0f5c54" strokeWidth={2} dot={{ r: 3 }} isAnimationActive={false} />
                </LineChart>
              </ResponsiveContainer>
            </div>
          </Card>
        );
      })}
      {treatments.length > 0 && (
        <Card>
          <h2 className="mb-1 font-bold">Treatments</h2>
          <ul className="text-sm">
            {treatments.map((t, i) => (
              <li key={i}>{fullFmt(t.t)} · {t.label}</li>
            ))}
          </ul>
        </Card>
      )}
    </div>
  );
}
