import { data, redirect } from "react-router";
import { Button, Card, Field, Notice, PageTitle, Select, TextArea } from "~/components/ui";
import { ClientInputError } from "~/features/clients/clients.server";
import { listUsers, setBanned, setRole } from "~/features/clients/users.server";
import { Pager, withParams } from "~/components/Pager";
import { askedPage, searchText } from "~/lib/paging";
import { ROLE_NAMES } from "~/lib/permissions";
import { requirePermission } from "~/lib/session.server";
import type { Route } from "./+types/users";

export const meta: Route.MetaFunction = () => [{ title: "Users · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const admin = requirePermission(context, request, { user: ["list"] });
  const url = new URL(request.url);
  const q = searchText(url);
  const { users, page } = await listUsers({ q, page: askedPage(url) });
  return { me: admin.id, q, page, users: users.map((u) => ({ ...u, createdAt: u.createdAt.toISOString() })) };
}

export async function action({ context, request }: Route.ActionArgs) {
  const admin = requirePermission(context, request, { user: ["list"] });
  const fd = await request.formData();
  const intent = String(fd.get("intent") ?? "");
  const userId = String(fd.get("userId") ?? "");
  try {
    if (intent === "role") await setRole(admin, userId, String(fd.get("role") ?? ""));
    else if (intent === "ban") {
      // A ban ends every session of the account at once: it needs a reason and a confirmation.
      const reason = String(fd.get("reason") ?? "").trim();
      if (reason.length < 3 || reason.length > 500) return data({ userId, intent, form: "Write why the account is banned (3 to 500 characters); the reason is kept with the ban." }, { status: 400 });
      if (fd.get("confirm") !== "yes") return data({ userId, intent, reason, form: "Tick the box to confirm the ban: the person is signed out everywhere at once." }, { status: 400 });
      await setBanned(admin, userId, true, reason);
    }
    else if (intent === "unban") await setBanned(admin, userId, false);
    else return data({ userId, form: "Unknown action." }, { status: 400 });
  } catch (e) {
    if (e instanceof ClientInputError) return data({ userId, form: e.message }, { status: e.status });
    throw e;
  }
  return redirect("/admin/users");
}

export default function AdminUsers({ loaderData, actionData }: Route.ComponentProps) {
  const { users, me, q, page } = loaderData;
  const a = actionData as { userId?: string; intent?: string; reason?: string; form?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle sub="Accounts, their roles, and bans.">Users</PageTitle>
      {a?.form && a.intent !== "ban" && <Notice tone="alert">{a.form}</Notice>}
      <form method="get" role="search" className="flex flex-wrap items-end gap-2">
        <label className="flex min-w-56 flex-1 flex-col text-sm font-bold">
          Find a user by name or e-mail
          <input name="q" type="search" defaultValue={q} className="mt-1 rounded-lg border border-line px-3 py-2 font-normal" />
        </label>
        <Button type="submit">Search</Button>
        {q && <a href="/admin/users" className="px-2 py-2">Show all</a>}
      </form>
      <p className="text-ink-soft" data-testid="users-total">
        {page.total} account{page.total === 1 ? "" : "s"}{q ? ` matching “${q}”` : ""}
      </p>
      <ul className="space-y-3" data-testid="users">
        {users.map((u) => (
          <li key={u.id}>
            <Card className="flex flex-wrap items-center gap-3">
              <div className="min-w-48 flex-1">
                <p className="font-bold">{u.name}{u.id === me ? " (you)" : ""}</p>
                <p className="text-sm text-ink-soft">{u.email}{u.emailVerified ? "" : " · not confirmed"}{u.banned ? ` · banned${u.banReason ? `: ${u.banReason}` : ""}` : ""}</p>
              </div>
              {u.id !== me && (
                <>
                  <form method="post" className="flex items-center gap-2">
                    <input type="hidden" name="intent" value="role" />
                    <input type="hidden" name="userId" value={u.id} />
                    <Select name="role" defaultValue={u.role} aria-label={`Role of ${u.email}`} className="w-40">
                      {ROLE_NAMES.map((r) => (
                        <option key={r} value={r}>{r}</option>
                      ))}
                    </Select>
                    <Button type="submit" variant="secondary">Set role</Button>
                  </form>
                  {u.banned ? (
                    <form method="post">
                      <input type="hidden" name="intent" value="unban" />
                      <input type="hidden" name="userId" value={u.id} />
                      <Button type="submit" variant="secondary">Lift ban</Button>
                    </form>
                  ) : (
                    <details className="w-full" open={a?.userId === u.id && a?.intent === "ban"} data-testid="ban">
                      <summary className="inline-flex min-h-12 cursor-pointer items-center rounded-full px-4 font-bold text-alert hover:bg-alert-soft">Ban…</summary>
                      <form method="post" className="mt-3 space-y-3">
                        <input type="hidden" name="intent" value="ban" />
                        <input type="hidden" name="userId" value={u.id} />
                        {a?.userId === u.id && a.form && <Notice tone="alert">{a.form}</Notice>}
                        <Field label={`Why is ${u.email} banned?`} hint="Kept with the ban and shown to admins.">
                          <TextArea name="reason" rows={2} required minLength={3} maxLength={500} defaultValue={a?.userId === u.id ? a.reason : undefined} />
                        </Field>
                        <label className="flex items-start gap-2">
                          <input type="checkbox" name="confirm" value="yes" required className="mt-1 size-5 accent-alert" />
                          <span>I understand: {u.name} is signed out everywhere at once and cannot sign in until the ban is lifted.</span>
                        </label>
                        <Button type="submit" variant="danger">Ban this account</Button>
                      </form>
                    </details>
                  )}
                </>
              )}
            </Card>
          </li>
        ))}
      </ul>
      <Pager page={page.page} pages={page.pages} href={(p) => withParams({ q }, { page: p })} label="Pages of users" />
    </div>
  );
}
