// /admin/email: every e-mail Dipwell tried to send, with its status, attempts
// and the last error, so an admin sees bounces and a broken SMTP server.
import { PageTitle, EmptyState, cx } from "~/components/ui";
import { emailLogRows } from "~/features/notify/notifications.server";
import { EMAIL_STATUSES } from "~/features/notify/statuses";
import { Pager, withParams } from "~/components/Pager";
import { askedPage } from "~/lib/paging";
import { requirePermission } from "~/lib/session.server";
import { LocalTime } from "~/components/When";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/email";

export const meta: Route.MetaFunction = () => [{ title: "E-mail log · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  requirePermission(context, request, { mail: ["read"] });
  const asked = new URL(request.url).searchParams.get("status");
  const status = asked && (EMAIL_STATUSES as readonly string[]).includes(asked) ? asked : null;
  const { rows, page } = await emailLogRows(status, askedPage(new URL(request.url)));
  return {
    status, page,
    rows: rows.map((r) => ({
      id: r.id, kind: r.kind, to: r.to, subject: r.subject, status: r.status, attempts: r.attempts,
      lastError: r.lastError, updatedAt: r.updatedAt.toISOString(), updatedWhen: timeWords(request).own(r.updatedAt), sentAt: r.sentAt?.toISOString() ?? null,
    })),
  };
}

const tone: Record<string, string> = { sent: "bg-ok-soft text-ok", failed: "bg-caution-soft text-caution", dead: "bg-alert-soft text-alert" };

export default function AdminEmail({ loaderData }: Route.ComponentProps) {
  const { rows, status, page } = loaderData;
  return (
    <div className="space-y-4">
      <PageTitle sub="Failed messages are retried with growing gaps; “dead” ones gave up, or the mail server refused them for good.">E-mail log</PageTitle>
      <nav className="flex flex-wrap gap-2" aria-label="Filter by status">
        {[null, ...EMAIL_STATUSES].map((s) => (
          <a key={s ?? "all"} href={s ? `?status=${s}` : "?"} className={cx("rounded-lg px-3 py-2 font-bold no-underline", s === status ? "bg-well-50 text-well-900" : "text-ink-soft")}>
            {s ?? "all"}
          </a>
        ))}
      </nav>
      {rows.length === 0 ? (
        <EmptyState title="No e-mail here" />
      ) : (
        <ul className="divide-y divide-line rounded-card border border-line bg-shell">
          {rows.map((r) => (
            <li key={r.id} className="px-4 py-3">
              <p className="font-bold">
                <span className={cx("mr-2 rounded px-2 text-sm", tone[r.status] ?? "bg-well-50")}>{r.status}</span>
                {r.subject}
              </p>
              <p className="text-sm text-ink-soft">
                {r.kind} · to {r.to} · {r.attempts} attempt{r.attempts === 1 ? "" : "s"} · <LocalTime at={r.updatedAt} text={r.updatedWhen} />
              </p>
              {r.lastError && <p className="text-sm text-alert">{r.lastError}</p>}
            </li>
          ))}
        </ul>
      )}
      <Pager page={page.page} pages={page.pages} href={(p) => withParams({ status }, { page: p })} label="Pages of the e-mail log" />
    </div>
  );
}
