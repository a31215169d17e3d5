import { data, Form, redirect } from "react-router";
import { BackLink, Button, Card, PageTitle } from "~/components/ui";
import { TubForm } from "~/features/tubs/TubForm";
import { listBatches, parseTubForm, setArchived, updateTub } from "~/features/tubs/tubs.server";
import { userUnits } from "~/features/plan/units.server";
import { tubGuard } from "~/lib/tub-access.server";
import type { Route } from "./+types/edit";

export const meta: Route.MetaFunction = () => [{ title: "Tub settings · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "own");
  const units = await userUnits(user.id);
  const volume = tub.volumeUnit === "USgal" ? tub.volumeLitres / 3.785411784 : tub.volumeUnit === "UKgal" ? tub.volumeLitres / 4.54609 : tub.volumeLitres;
  return {
    batches: await listBatches({ keep: tub.batchId }),
    tub: {
      id: tub.id, archived: Boolean(tub.archivedAt),
      initial: { name: tub.name, volume: String(Math.round(volume)), volumeUnit: (tub.volumeUnit === "USgal" || tub.volumeUnit === "UKgal" ? tub.volumeUnit : "L") as "L" | "USgal" | "UKgal", sanitiser: tub.sanitiser, batchId: tub.batchId ?? "", timeZone: tub.timeZone, setTemperature: String(units === "us" ? Math.round((tub.temperatureC * 9) / 5 + 32) : tub.temperatureC), temperatureUnit: (units === "us" ? "F" : "C") as "C" | "F", bathersPerDay: String(tub.bathersPerDay), guidance: tub.guidance as "us_home" | "us_public" | "uk" },
    },
  };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { tub } = await tubGuard({ context, request, params }, "own");
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "archive" || intent === "restore") {
    await setArchived(tub.id, intent === "archive");
    return redirect(intent === "archive" ? "/tubs?archived=1" : `/tubs/${tub.id}`);
  }
  const parsed = await parseTubForm(form, { currentBatchId: tub.batchId });
  if (!parsed.ok) return data({ fields: parsed.fields, form: "A few answers need another look: each one says what to change. Nothing is saved yet." }, { status: 400 });
  const { shape, ...rest } = parsed.values;
  await updateTub(tub.id, shape ? { ...rest, shape } : rest);
  return redirect(`/tubs/${tub.id}?saved=1`);
}

export default function EditTub({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, batches } = loaderData;
  return (
    <div className="mx-auto max-w-xl space-y-6">
      <BackLink href={`/tubs/${tub.id}`}>{tub.initial.name}</BackLink>
      <PageTitle>Tub settings</PageTitle>
      <TubForm initial={tub.initial} batches={batches} errors={actionData?.fields} formError={actionData?.form} submitLabel="Save changes" />
      <Card>
        <h2 className="text-lg font-bold">{tub.archived ? "Restore this tub" : "Archive this tub"}</h2>
        <p className="mb-3 text-ink-soft">
          {tub.archived
            ? "Bring the tub back to your list. Its readings are all still here."
            : "Archiving hides the tub from your list. Its readings, photos and treatments are kept, and you can restore it here."}
        </p>
        <Form method="post">
          <input type="hidden" name="intent" value={tub.archived ? "restore" : "archive"} />
          <Button variant={tub.archived ? "secondary" : "danger"}>{tub.archived ? "Restore tub" : "Archive tub"}</Button>
        </Form>
      </Card>
    </div>
  );
}
