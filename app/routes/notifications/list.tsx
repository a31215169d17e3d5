// /notifications: everything Dipwell reminded the user of, newest first.
import { Form, data } from "react-router";
import { z } from "zod";
import { Button, Card, EmptyState, PageTitle, cx } from "~/components/ui";
import { listNotifications, markRead } from "~/features/notify/notifications.server";
import { requireUser } from "~/lib/session.server";
import { LocalTime } from "~/components/When";
import { timeWords } from "~/lib/dates";
import type { Route } from "./+types/list";

export const meta: Route.MetaFunction = () => [{ title: "Notifications · Dipwell" }];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const rows = await listNotifications(user.id);
  return {
    items: rows.map((n) => ({ id: n.id, kind: n.kind, title: n.title, body: n.body, link: n.link, createdAt: n.createdAt.toISOString(), when: timeWords(request).own(n.createdAt), read: n.readAt !== null })),
  };
}

const Input = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("read"), id: z.string().uuid("That notification was not found.") }),
  z.object({ intent: z.literal("read-all") }),
]);

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const parsed = Input.safeParse(Object.fromEntries(await request.formData()));
  if (!parsed.success) return data({ form: "Something was missing from the form. Please try again." }, { status: 400 });
  await markRead(user.id, parsed.data.intent === "read" ? parsed.data.id : null);
  return { form: null };
}

export default function Notifications({ loaderData }: Route.ComponentProps) {
  const { items } = loaderData;
  const unread = items.filter((i) => !i.read).length;
  return (
    <div className="space-y-4">
      <PageTitle sub={unread ? `${unread} unread` : "All caught up"}>Notifications</PageTitle>
      <div className="flex flex-wrap gap-2">
        {unread > 0 && (
          <Form method="post">
            <input type="hidden" name="intent" value="read-all" />
            <Button variant="secondary">Mark all as read</Button>
          </Form>
        )}
        <a href="/settings/notifications" className="inline-flex min-h-12 items-center px-2 font-bold text-well-700">Choose what Dipwell sends</a>
      </div>
      {items.length === 0 ? (
        <EmptyState title="No notifications yet">Reminders to retest, test, change the water and your weekly summaries appear here.</EmptyState>
      ) : (
        <ul className="space-y-2">
          {items.map((n) => (
            <li key={n.id}>
              <Card className={cx("flex flex-wrap items-start gap-3", !n.read && "border-well-500")}>
                <div className="min-w-0 flex-1">
                  <p className="font-bold">
                    {!n.read && <span className="mr-2 inline-block rounded-full bg-well-700 px-2 text-xs text-white">New</span>}
                    {n.link ? <a href={n.link}>{n.title}</a> : n.title}
                  </p>
                  <p className="text-ink-soft">{n.body}</p>
                  <p className="text-sm text-ink-soft"><LocalTime at={n.createdAt} text={n.when} /></p>
                </div>
                {!n.read && (
                  <Form method="post">
                    <input type="hidden" name="intent" value="read" />
                    <input type="hidden" name="id" value={n.id} />
                    <Button variant="quiet">Mark read</Button>
                  </Form>
                )}
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
