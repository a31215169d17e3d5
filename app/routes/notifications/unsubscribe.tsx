// /unsubscribe/:token/:kind — the "stop these e-mails" link and the one-click
// List-Unsubscribe-Post target (RFC 8058). Works without signing in: the token
// is the secret. GET shows a confirmation button (link checkers that open
// every link change nothing); POST switches the kind off.
import { Form, data } from "react-router";
import { AuthFrame, Button, Notice } from "~/components/ui";
import { preferenceByToken, unsubscribe } from "~/features/notify/preferences.server";
import { MESSAGE_KINDS, isMessageKind } from "~/features/notify/schedule";
import type { Route } from "./+types/unsubscribe";

export const meta: Route.MetaFunction = () => [{ title: "Stop e-mails · Dipwell" }];

const notFound = () => data({ message: "This link is not valid any more. Sign in and choose what Dipwell sends under Settings." }, { status: 404 });

export async function loader({ params }: Route.LoaderArgs) {
  if (!isMessageKind(params.kind)) throw notFound();
  const pref = await preferenceByToken(params.token);
  if (!pref) throw notFound();
  return { kind: params.kind, label: MESSAGE_KINDS[params.kind], already: pref.disabledKinds.includes(params.kind), done: false };
}

export async function action({ params }: Route.ActionArgs) {
  const out = await unsubscribe(params.token, params.kind);
  if (!out) throw notFound();
  return { kind: out.kind, label: MESSAGE_KINDS[out.kind], already: true, done: true };
}

export default function Unsubscribe({ loaderData, actionData }: Route.ComponentProps) {
  const d = actionData ?? loaderData;
  return (
    <AuthFrame title="Stop these e-mails">
      {d.already ? (
        <Notice tone="ok">
          Done: Dipwell will not e-mail you about “{d.label}” any more. You can switch it back on under Settings, Notifications.
        </Notice>
      ) : (
        <Form method="post" className="space-y-4">
          <p>Stop e-mails about “{d.label}”? Other messages are not affected.</p>
          <input type="hidden" name="List-Unsubscribe" value="One-Click" />
          <Button type="submit">Stop these e-mails</Button>
        </Form>
      )}
      <p className="mt-4 text-sm"><a href="/settings/notifications">Choose what Dipwell sends</a></p>
    </AuthFrame>
  );
}
