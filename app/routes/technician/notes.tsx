import { data, redirect } from "react-router";
import { z } from "zod";
import { Button, Card, EmptyState, Field, Input, Notice, PageTitle } from "~/components/ui";
import { addNote, notesFor } from "~/features/clients/clients.server";
import { requireUser } from "~/lib/session.server";
import { requireTub } from "~/lib/tubs.server";
import { Day } from "~/components/When";
import type { Route } from "./+types/notes";

export const meta: Route.MetaFunction = () => [{ title: "Visit notes · Dipwell" }];

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  const { tub, relation } = await requireTub(user, params.tubId, "view");
  const notes = await notesFor(tub);
  return { tub: { id: tub.id, name: tub.name }, relation, notes: notes.map((n) => ({ id: n.id, body: n.body, visitedAt: n.visitedAt.toISOString(), author: n.author ?? "" })) };
}

const form = z.object({
  body: z.string().trim().min(1, "Write what you did or saw on the visit.").max(4000, "Keep the note under 4000 characters."),
  visitedOn: z.string().trim().refine((v) => v === "" || /^\d{4}-\d{2}-\d{2}$/.test(v), "Enter the visit date as a date."),
});

export async function action({ context, request, params }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const { tub } = await requireTub(user, params.tubId, "care");
  const fd = await request.formData();
  const parsed = form.safeParse({ body: fd.get("body") ?? "", visitedOn: fd.get("visitedOn") ?? "" });
  if (!parsed.success) return data({ form: parsed.error.issues.map((i) => i.message).join(" "), body: String(fd.get("body") ?? "") }, { status: 400 });
  const visited = parsed.data.visitedOn ? new Date(`${parsed.data.visitedOn}T12:00:00Z`) : new Date();
  await addNote(user, tub, parsed.data.body, visited);
  return redirect(`/tubs/${tub.id}/notes`);
}

export default function Notes({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, notes } = loaderData;
  const a = actionData as { form?: string; body?: string } | undefined;
  return (
    <div className="space-y-5">
      <PageTitle sub={<a href={`/tubs/${tub.id}`}>{tub.name}</a>}>Visit notes</PageTitle>
      <Card>
        <form method="post" className="space-y-3">
          {a?.form && <Notice tone="alert">{a.form}</Notice>}
          <Field label="Note">
            <textarea name="body" rows={4} defaultValue={a?.body} className="w-full rounded-xl border border-line bg-white p-3" />
          </Field>
          <Field label="Visit date" hint="Leave empty for today.">
            <Input name="visitedOn" type="date" />
          </Field>
          <Button type="submit">Add note</Button>
        </form>
      </Card>
      {notes.length === 0 ? (
        <EmptyState title="No visit notes yet">Notes from each visit appear here, newest first.</EmptyState>
      ) : (
        <ul className="space-y-3">
          {notes.map((n) => (
            <li key={n.id}>
              <Card>
                <p className="text-sm text-ink-soft"><Day day={n.visitedAt} /> · {n.author}</p>
                <p className="whitespace-pre-wrap">{n.body}</p>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
