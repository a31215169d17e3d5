import { data, redirect } from "react-router";
import { Button, Card, EmptyState, Field, Input, Notice, PageTitle } from "~/components/ui";
import { ClientInputError, inviteTechnician, revokeAccess, sharingFor, withdrawInvitation } from "~/features/clients/clients.server";
import { tubGuard } from "~/lib/tub-access.server";
import { LocalTime } from "~/components/When";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/sharing";

export const meta: Route.MetaFunction = () => [{ title: "Sharing · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { tub } = await tubGuard({ context, request, params }, "own");
  const { access, invites } = await sharingFor(tub);
  return {
    tub: { id: tub.id, name: tub.name },
    access: access.map((x) => ({ id: x.id, name: x.name, email: x.email, since: x.createdAt.toISOString(), sinceWhen: timeWords(request).ownDate(x.createdAt) })),
    invites: invites.map((i) => ({ id: i.id, email: i.email, expiresAt: i.expiresAt.toISOString(), expiresWhen: timeWords(request).ownDate(i.expiresAt), expired: i.expiresAt < new Date(), declined: Boolean(i.declinedAt) })),
    sent: new URL(request.url).searchParams.get("sent"),
  };
}

export async function action({ context, request, params }: Route.ActionArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "own");
  const fd = await request.formData();
  const intent = String(fd.get("intent") ?? "");
  try {
    if (intent === "invite") {
      const inv = await inviteTechnician(user, tub, String(fd.get("email") ?? ""));
      return redirect(`/tubs/${tub.id}/sharing?sent=${encodeURIComponent(inv.email)}`);
    }
    if (intent === "withdraw") await withdrawInvitation(tub, String(fd.get("id") ?? ""));
    else if (intent === "revoke") await revokeAccess(tub, String(fd.get("id") ?? ""));
    else return data({ form: "Unknown action.", email: "" }, { status: 400 });
    return redirect(`/tubs/${tub.id}/sharing`);
  } catch (e) {
    if (e instanceof ClientInputError) return data({ form: e.message, email: String(fd.get("email") ?? "") }, { status: e.status });
    throw e;
  }
}

export default function Sharing({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, access, invites, sent } = loaderData;
  const a = actionData as { form?: string; email?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle sub="Invite a technician to look after this tub, or end their access.">Sharing “{tub.name}”</PageTitle>
      {sent && <Notice tone="ok">Invitation sent to {sent}.</Notice>}
      <Card>
        <h2 className="mb-2 text-lg font-bold">Technicians with access</h2>
        {access.length === 0 ? (
          <EmptyState title="No technician yet">Invite one below.</EmptyState>
        ) : (
          <ul className="divide-y divide-line">
            {access.map((x) => (
              <li key={x.id} className="flex flex-wrap items-center gap-3 py-2">
                <span className="font-bold">{x.name}</span>
                <span className="text-sm text-ink-soft">{x.email} · since <LocalTime at={x.since} text={x.sinceWhen} date /></span>
                <form method="post" className="ml-auto">
                  <input type="hidden" name="intent" value="revoke" />
                  <input type="hidden" name="id" value={x.id} />
                  <Button variant="danger" type="submit">End access</Button>
                </form>
              </li>
            ))}
          </ul>
        )}
      </Card>
      {invites.length > 0 && (
        <Card>
          <h2 className="mb-2 text-lg font-bold">Open invitations</h2>
          <ul className="divide-y divide-line">
            {invites.map((i) => (
              <li key={i.id} className="flex flex-wrap items-center gap-3 py-2">
                <span>{i.email}</span>
                <span className={i.declined ? "text-sm font-bold text-caution" : "text-sm text-ink-soft"}>{i.declined ? "declined" : i.expired ? "expired" : <>until <LocalTime at={i.expiresAt} text={i.expiresWhen} date /></>}</span>
                <form method="post" className="ml-auto">
                  <input type="hidden" name="intent" value="withdraw" />
                  <input type="hidden" name="id" value={i.id} />
                  <Button variant="secondary" type="submit">{i.declined ? "Clear" : "Withdraw"}</Button>
                </form>
              </li>
            ))}
          </ul>
        </Card>
      )}
      <Card>
        <form method="post" className="space-y-3">
          <input type="hidden" name="intent" value="invite" />
          {a?.form && <Notice tone="alert">{a.form}</Notice>}
          <Field label="Technician's e-mail address">
            <Input name="email" type="email" defaultValue={a?.email} autoComplete="off" />
          </Field>
          <Button type="submit">Send invitation</Button>
        </form>
      </Card>
    </div>
  );
}
