import { data, redirect } from "react-router";
import { PageTitle, BackLink } from "~/components/ui";
import { TubForm } from "~/features/tubs/TubForm";
import { createTub, listBatches, parseTubForm } from "~/features/tubs/tubs.server";
import { requireUser } from "~/lib/session.server";
import { userUnits } from "~/features/plan/units.server";
import { useEffect, useState } from "react";
import { browserZone } from "~/lib/dates";
import type { Route } from "./+types/new";

export const meta: Route.MetaFunction = () => [{ title: "Add a tub · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  return { batches: await listBatches(), units: await userUnits(user.id) };
}

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const parsed = await parseTubForm(await request.formData());
  if (!parsed.ok) return data({ fields: parsed.fields, form: "A few answers need another look: each one says what to change. Nothing is saved yet." }, { status: 400 });
  const t = await createTub(user, parsed.values);
  return redirect(`/tubs/${t.id}?added=1`);
}

export default function NewTub({ loaderData, actionData }: Route.ComponentProps) {
  // The browser's zone, once the page runs in the browser (the server cannot know it).
  const [tz, setTz] = useState("UTC");
  useEffect(() => setTz(browserZone()), []);
  return (
    <div className="mx-auto max-w-xl">
      <BackLink href="/tubs">All tubs</BackLink>
      <PageTitle sub="A few facts about the water, so readings and treatment steps fit your tub.">Add a tub</PageTitle>
      <TubForm
        initial={{
          name: "",
          volume: "",
          volumeUnit: loaderData.units === "us" ? "USgal" : "L",
          sanitiser: "chlorine",
          batchId: loaderData.batches[0]?.id ?? "",
          timeZone: tz || "UTC",
          setTemperature: loaderData.units === "us" ? "100" : "38",
          temperatureUnit: loaderData.units === "us" ? "F" : "C",
          bathersPerDay: "2",
          guidance: "us_home",
        }}
        batches={loaderData.batches}
        errors={actionData?.fields}
        formError={actionData?.form}
        submitLabel="Add tub"
      />
    </div>
  );
}
