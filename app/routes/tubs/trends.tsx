// Trends: the charts load their data from /api/tubs/:tubId/trends through react-query.
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState } from "react";
import { TrendCharts } from "~/components/reading/TrendCharts";
import { BackLink, ButtonLink, PageTitle } from "~/components/ui";
import { TREND_PERIODS } from "~/features/readings/periods";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/trends";

export const meta: Route.MetaFunction = () => [{ title: "Trends · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "view");
  const asked = Number(new URL(request.url).searchParams.get("days"));
  const days = (TREND_PERIODS as readonly number[]).includes(asked) ? asked : TREND_PERIODS[0];
  return { tub: { id: tub.id, name: tub.name, timeZone: tub.timeZone }, days };
}

const PERIOD_WORDS: Record<number, string> = { 7: "7 days", 30: "30 days", 90: "90 days", 365: "1 year", 1095: "3 years" };

export default function Trends({ loaderData }: Route.ComponentProps) {
  const { tub, days } = loaderData;
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { retry: 1, staleTime: 30_000 } } }));
  return (
    <QueryClientProvider client={client}>
      <div className="space-y-5">
        <BackLink href={`/tubs/${tub.id}`}>{tub.name}</BackLink>
        <PageTitle sub="Every reading over time, with your target range shaded.">Trends</PageTitle>
        <div className="flex flex-wrap gap-3">
          <ButtonLink href={`/tubs/${tub.id}/read`}>New reading</ButtonLink>
          <ButtonLink variant="secondary" href={`/tubs/${tub.id}/history`}>History</ButtonLink>
        </div>
        <nav aria-label="Period" className="flex flex-wrap gap-2">
          {[...TREND_PERIODS].sort((a, b) => a - b).map((d) => (
            <a key={d} href={`?days=${d}`} aria-current={d === days ? "page" : undefined} className={d === days ? "rounded-lg bg-well-50 px-3 py-2 font-bold text-well-900 no-underline" : "rounded-lg px-3 py-2 font-bold text-ink-soft no-underline"}>
              {PERIOD_WORDS[d] ?? `${d} days`}
            </a>
          ))}
        </nav>
        <TrendCharts tubId={tub.id} timeZone={tub.timeZone} days={days} />
      </div>
    </QueryClientProvider>
  );
}
