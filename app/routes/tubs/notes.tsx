import { data, redirect } from "react-router";
import { z } from "zod";
import { Button, Card, EmptyState, Field, Input, Notice, PageTitle, TextArea } from "~/components/ui";
import { addNote, ClientInputError, deleteNote, notesFor, updateNote } from "~/features/clients/clients.server";
import { can } from "~/lib/permissions";
import { tubGuard } from "~/lib/tub-access.server";
import { Day } from "~/components/When";
import { Pager } from "~/components/Pager";
import { askedPage } from "~/lib/paging";
import type { Route } from "./+types/notes";

export const meta: Route.MetaFunction = () => [{ title: "Visit notes · Dipwell" }];

/** Today's date (YYYY-MM-DD) where the tub is: the latest visit date a note may carry. */
function todayAt(timeZone: string, now = new Date()) {
  try {
    return new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(now);
  } catch {
    return now.toISOString().slice(0, 10);
  }
}

export async function loader({ context, request, params }: Route.LoaderArgs) {
  const { user, tub, relation } = await tubGuard({ context, request, params }, "view");
  const url = new URL(request.url);
  const { rows: notes, page } = await notesFor(tub, askedPage(url));
  const admin = can(user, { note: ["edit-any"] });
  return {
    tub: { id: tub.id, name: tub.name },
    relation,
    today: todayAt(tub.timeZone),
    edited: url.searchParams.get("done"),
    page: { page: page.page, pages: page.pages, total: page.total },
    notes: notes.map((n) => ({
      id: n.id, body: n.body, author: n.author ?? "",
      visitedOn: n.visitedAt.toISOString().slice(0, 10),
      mine: admin || n.authorId === user.id,
    })),
  };
}

const noteForm = (today: string) =>
  z.object({
    body: z.string().trim().min(1, "Write what you did or saw on the visit.").max(4000, "Keep the note under 4000 characters."),
    visitedOn: z
      .string()
      .trim()
      .refine((v) => v === "" || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T12:00:00Z`))), "Enter the visit date as a date, for example 2026-03-14.")
      .refine((v) => v === "" || v <= today, "The visit date cannot be in the future. Enter the day of the visit, today or earlier.")
      .refine((v) => v === "" || v >= "2000-01-01", "Enter the visit date of this tub's visit (2000 or later)."),
  });

export async function action({ context, request, params }: Route.ActionArgs) {
  const { user, tub } = await tubGuard({ context, request, params }, "care");
  const fd = await request.formData();
  const intent = String(fd.get("intent") ?? "add");
  const noteId = String(fd.get("noteId") ?? "");
  try {
    if (intent === "delete") {
      await deleteNote(user, tub, noteId);
      return redirect(`/tubs/${tub.id}/notes?done=deleted`);
    }
    const parsed = noteForm(todayAt(tub.timeZone)).safeParse({ body: fd.get("body") ?? "", visitedOn: fd.get("visitedOn") ?? "" });
    if (!parsed.success) {
      const fields: Record<string, string> = {};
      for (const i of parsed.error.issues) fields[String(i.path[0])] ??= i.message;
      return data({ intent, noteId, fields, body: String(fd.get("body") ?? ""), visitedOn: String(fd.get("visitedOn") ?? "") }, { status: 400 });
    }
    const visited = parsed.data.visitedOn ? new Date(`${parsed.data.visitedOn}T12:00:00Z`) : null;
    if (intent === "edit") {
      await updateNote(user, tub, noteId, parsed.data.body, visited);
      return redirect(`/tubs/${tub.id}/notes?done=saved`);
    }
    await addNote(user, tub, parsed.data.body, visited ?? new Date());
    return redirect(`/tubs/${tub.id}/notes`);
  } catch (e) {
    if (e instanceof ClientInputError) return data({ intent, noteId, form: e.message, fields: {} as Record<string, string>, body: "", visitedOn: "" }, { status: e.status });
    throw e;
  }
}

type ActionShape = { intent?: string; noteId?: string; form?: string; fields?: Record<string, string>; body?: string; visitedOn?: string } | undefined;

export default function Notes({ loaderData, actionData }: Route.ComponentProps) {
  const { tub, notes, today, relation, edited, page } = loaderData;
  const a = actionData as ActionShape;
  const adding = !a || a.intent === "add";
  const canWrite = relation !== null;
  return (
    <div className="space-y-5">
      <PageTitle sub={<a href={`/tubs/${tub.id}`}>{tub.name}</a>}>Visit notes</PageTitle>
      {edited === "saved" && <Notice tone="ok">The note is saved.</Notice>}
      {edited === "deleted" && <Notice tone="ok">The note is deleted.</Notice>}
      {a?.form && <Notice tone="alert">{a.form}</Notice>}
      {canWrite && (
        <Card>
          <h2 className="mb-3 text-lg font-bold">New note</h2>
          <form method="post" className="space-y-4" noValidate>
            <input type="hidden" name="intent" value="add" />
            <Field label="Note" error={adding ? a?.fields?.body : undefined}>
              <TextArea name="body" rows={4} defaultValue={adding ? a?.body : undefined} />
            </Field>
            <Field label="Visit date" hint="Leave it empty for today. A visit cannot be in the future." error={adding ? a?.fields?.visitedOn : undefined}>
              <Input name="visitedOn" type="date" max={today} defaultValue={adding ? a?.visitedOn : undefined} />
            </Field>
            <Button type="submit">Add note</Button>
          </form>
        </Card>
      )}
      {notes.length === 0 ? (
        <EmptyState title="No visit notes yet">Notes from each visit appear here, newest first.</EmptyState>
      ) : (
        <ul className="space-y-3" data-testid="notes">
          {notes.map((n) => {
            const mineFailed = a && a.noteId === n.id && a.intent === "edit" ? a : undefined;
            return (
              <li key={n.id}>
                <Card className="space-y-2">
                  <p className="text-sm text-ink-soft"><Day day={n.visitedOn} /> · {n.author}</p>
                  <p className="whitespace-pre-wrap">{n.body}</p>
                  {n.mine && (
                    <div className="flex flex-wrap gap-2">
                      <details className="w-full" open={Boolean(mineFailed)}>
                        <summary className="inline-flex min-h-10 cursor-pointer items-center rounded-full px-3 font-bold text-well-700 hover:bg-well-50">Edit this note</summary>
                        <form method="post" className="mt-2 space-y-3" noValidate>
                          <input type="hidden" name="intent" value="edit" />
                          <input type="hidden" name="noteId" value={n.id} />
                          <Field label="Note" error={mineFailed?.fields?.body}>
                            <TextArea name="body" rows={4} defaultValue={mineFailed?.body ?? n.body} />
                          </Field>
                          <Field label="Visit date" error={mineFailed?.fields?.visitedOn}>
                            <Input name="visitedOn" type="date" max={today} defaultValue={mineFailed?.visitedOn ?? n.visitedOn} />
                          </Field>
                          <Button type="submit">Save the note</Button>
                        </form>
                      </details>
                      <details className="w-full">
                        <summary className="inline-flex min-h-10 cursor-pointer items-center rounded-full px-3 font-bold text-alert hover:bg-alert-soft">Delete this note…</summary>
                        <form method="post" className="mt-2 flex flex-wrap items-center gap-3">
                          <input type="hidden" name="intent" value="delete" />
                          <input type="hidden" name="noteId" value={n.id} />
                          <span>The note is removed for everyone who looks after this tub.</span>
                          <Button type="submit" variant="danger">Yes, delete the note</Button>
                        </form>
                      </details>
                    </div>
                  )}
                </Card>
              </li>
            );
          })}
        </ul>
      )}
      <Pager page={page.page} pages={page.pages} href={(p) => `?page=${p}`} label="Pages of visit notes" />
    </div>
  );
}
