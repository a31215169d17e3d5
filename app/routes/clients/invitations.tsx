import { data, redirect } from "react-router";
import { Button, Card, Notice, PageTitle } from "~/components/ui";
import { acceptInvitation, ClientInputError, declineInvitation, loadInvitation } from "~/features/clients/clients.server";
import { requireUser } from "~/lib/session.server";
import type { Route } from "./+types/invitations";

export const meta: Route.MetaFunction = () => [{ title: "Invitation · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const found = await loadInvitation(params.token);
  if (!found || !found.tub) throw data({ message: "This invitation does not exist. Ask the tub's owner to invite you again." }, { status: 404 });
  return { tubName: found.tub.name, ownerName: found.ownerName, email: found.inv.email, state: found.state, signedInAs: user.email, role: user.role ?? "owner" };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const intent = String((await request.formData()).get("intent") ?? "accept");
  try {
    if (intent === "decline") {
      await declineInvitation(user, params.token);
      return redirect(`/invitations/${params.token}`);
    }
    const t = await acceptInvitation(user, params.token);
    return redirect(`/tubs/${t.id}`);
  } catch (e) {
    if (e instanceof ClientInputError) return data({ form: e.message }, { status: e.status });
    throw e;
  }
}

export default function Invitation({ loaderData, actionData }: Route.ComponentProps) {
  const { tubName, ownerName, email, state, signedInAs } = loaderData;
  const a = actionData as { form?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle>Look after “{tubName}”</PageTitle>
      <Card className="space-y-3">
        <p>{ownerName} invites {email} to look after the hot tub “{tubName}”.</p>
        {state === "open" ? (
          <form method="post" className="space-y-3">
            {a?.form && <Notice tone="alert">{a.form}</Notice>}
            <p className="text-sm text-ink-soft">You are signed in as {signedInAs}.</p>
            <div className="flex flex-wrap gap-3">
              <Button type="submit" name="intent" value="accept">Accept the invitation</Button>
              <Button type="submit" name="intent" value="decline" variant="secondary">Decline</Button>
            </div>
            <p className="text-sm text-ink-soft">If you decline, {ownerName || "the owner"} is told, and can invite someone else.</p>
          </form>
        ) : (
          <Notice tone="caution">
            {state === "accepted" ? "This invitation has already been accepted." : state === "declined" ? "You declined this invitation. The owner has been told." : state === "expired" ? "This invitation has expired. Ask the owner to invite you again." : "The owner has withdrawn this invitation."}
          </Notice>
        )}
      </Card>
    </div>
  );
}
