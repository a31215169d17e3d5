// The local mail catcher's messages, for an admin on a development or test
// machine. There is no inbox in production (MAIL_CATCHER_URL unset): 404.
import { data } from "react-router";
import { Card, EmptyState, PageTitle } from "~/components/ui";
import { env } from "~/lib/env.server";
import { requirePermission } from "~/lib/session.server";
import { LocalTime } from "~/components/When";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/inbox";

type CaughtMail = { id: string; subject: string; date: string; to: { address: string }[]; text?: string; html?: string };

export const meta: Route.MetaFunction = () => [{ title: "Mail inbox · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  requirePermission(context, request, { mail: ["read"] });
  const base = env().MAIL_CATCHER_URL;
  if (!base) throw data({ message: "The mail inbox exists only on development machines." }, { status: 404 });
  const res = await fetch(`${base}/email`).catch(() => null);
  if (!res?.ok) return { messages: [], unavailable: true, open: null };
  const words = timeWords(request);
  const all = ((await res.json()) as CaughtMail[]).sort((a, b) => b.date.localeCompare(a.date));
  const openId = new URL(request.url).searchParams.get("open");
  const open = all.find((m) => m.id === openId) ?? null;
  return {
    unavailable: false,
    messages: all.slice(0, 100).map((m) => ({ id: m.id, subject: m.subject, date: m.date, when: words.own(m.date), to: m.to.map((t) => t.address).join(", ") })),
    open: open && { subject: open.subject, to: open.to.map((t) => t.address).join(", "), date: open.date, when: words.own(open.date), text: open.text ?? "", html: open.html ?? "" },
  };
}

export default function Inbox({ loaderData }: Route.ComponentProps) {
  const { messages, unavailable, open } = loaderData;
  return (
    <div className="space-y-4">
      <PageTitle sub="Every e-mail Dipwell sent on this machine, caught before it left.">Mail inbox</PageTitle>
      {unavailable && <EmptyState title="The mail catcher is not running">Start Dipwell with npm start to catch e-mail.</EmptyState>}
      {!unavailable && messages.length === 0 && <EmptyState title="No e-mail yet" />}
      {open && (
        <Card>
          <p className="text-lg font-bold">{open.subject}</p>
          <p className="text-sm text-ink-soft">To {open.to} · <LocalTime at={open.date} text={open.when} /></p>
          <iframe title="Message" sandbox="" srcDoc={open.html} className="mt-3 h-96 w-full rounded-lg border border-line bg-white" />
          <details className="mt-3">
            <summary className="cursor-pointer font-bold">Plain-text part</summary>
            <pre className="mt-2 whitespace-pre-wrap text-sm">{open.text}</pre>
          </details>
        </Card>
      )}
      {messages.length > 0 && (
      <ul className="divide-y divide-line rounded-card border border-line bg-shell">
        {messages.map((m) => (
          <li key={m.id}>
            <a href={`?open=${m.id}`} className="block px-4 py-3 no-underline hover:bg-well-50">
              <span className="block font-bold text-ink">{m.subject}</span>
              <span className="block text-sm text-ink-soft">{m.to} · <LocalTime at={m.date} text={m.when} /></span>
            </a>
          </li>
        ))}
      </ul>
      )}
    </div>
  );
}
