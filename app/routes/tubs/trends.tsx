// Trends: the charts load their data from /api/tubs/:tubId/trends through react-query.
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState } from "react";
import { TrendCharts } from "~/components/reading/TrendCharts";
import { ButtonLink, PageTitle } from "~/components/ui";
import { requireUser } from "~/lib/session.server";
import { requireTub } from "~/lib/tubs.server";
import type { Route } from "./+types/trends";

export const meta: Route.MetaFunction = () => [{ title: "Trends · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const { tub } = await requireTub(user, params.tubId, "view");
  return { tub: { id: tub.id, name: tub.name, timeZone: tub.timeZone } };
}

export default function Trends({ loaderData }: Route.ComponentProps) {
  const { tub } = loaderData;
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { retry: 1, staleTime: 30_000 } } }));
  return (
    <QueryClientProvider client={client}>
      <div className="space-y-5">
        <a href={`/tubs/${tub.id}`} className="text-sm">← {tub.name}</a>
        <PageTitle sub="Every reading over time, with your target range shaded.">Trends</PageTitle>
        <div className="flex flex-wrap gap-3">
          <ButtonLink href={`/tubs/${tub.id}/read`}>New reading</ButtonLink>
          <ButtonLink variant="secondary" href={`/tubs/${tub.id}/history`}>History</ButtonLink>
        </div>
        <TrendCharts tubId={tub.id} timeZone={tub.timeZone} />
      </div>
    </QueryClientProvider>
  );
}
