// /settings/notifications: which kinds of e-mail are on, the time zone and the quiet hours.
import { Form, data, redirect, useActionData } from "react-router";
import { Button, Card, Field, Notice, PageTitle, Select } from "~/components/ui";
import { ensurePreferences, savePreferences } from "~/features/notify/preferences.server";
import { MESSAGE_KINDS, isMessageKind, isValidTimeZone, type MessageKind } from "~/features/notify/schedule";
import { requireUser } from "~/lib/session.server";
import { browserZone, useDateSettings, useHydrated, zoneFromCookie } from "~/lib/dates";
import type { Route } from "./+types/settings";

export const meta: Route.MetaFunction = () => [{ title: "Notification settings · Dipwell" }];

const HOURS = Array.from({ length: 24 }, (_, h) => h);
const hourLabel = (h: number) => `${String(h).padStart(2, "0")}:00`;

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  // A new account's zone is the one its browser reported (app/lib/dates.ts).
  const pref = await ensurePreferences(user.id, { timeZone: zoneFromCookie(request.headers.get("cookie")) ?? undefined });
  const zones = Intl.supportedValuesOf("timeZone");
  return {
    timeZone: pref.timeZone, quietStartHour: pref.quietStartHour, quietEndHour: pref.quietEndHour,
    enabled: (Object.keys(MESSAGE_KINDS) as MessageKind[]).filter((k) => !pref.disabledKinds.includes(k)),
    zones: zones.includes(pref.timeZone) ? zones : [pref.timeZone, ...zones],
    saved: new URL(request.url).searchParams.has("saved"),
  };
}

export async function action({ context, request }: Route.ActionArgs) {
  const user = requireUser(context, request);
  const form = await request.formData();
  const fields: Record<string, string> = {};
  const timeZone = String(form.get("timeZone") ?? "");
  const start = Number(form.get("quietStartHour")), end = Number(form.get("quietEndHour"));
  if (!isValidTimeZone(timeZone) || timeZone === "") fields.timeZone = "Choose a time zone from the list.";
  if (!Number.isInteger(start) || start < 0 || start > 23) fields.quietStartHour = "Choose an hour from the list.";
  if (!Number.isInteger(end) || end < 0 || end > 23) fields.quietEndHour = "Choose an hour from the list.";
  if (Object.keys(fields).length) return data({ fields, form: "A few answers need another look: each one says what to change. Nothing is saved yet." }, { status: 400 });
  const enabledKinds = form.getAll("kind").map(String).filter(isMessageKind);
  await savePreferences(user.id, { timeZone, quietStartHour: start, quietEndHour: end, enabledKinds });
  return redirect("/settings/notifications?saved");
}

export default function NotificationSettings({ loaderData }: Route.ComponentProps) {
  const d = loaderData;
  // Stored as the bare UTC default while the browser is elsewhere: offer the browser's zone.
  const hydrated = useHydrated();
  const { timeZone: cookieZone } = useDateSettings();
  const seen = cookieZone ?? (hydrated ? browserZone() : null);
  const suggested = d.timeZone === "UTC" && seen && seen !== "UTC" && d.zones.includes(seen) ? seen : null;
  const zone = suggested ?? d.timeZone;
  const errors = useActionData<typeof action>() as { fields?: Record<string, string>; form?: string } | undefined;
  return (
    <div className="space-y-4">
      <PageTitle sub="Dipwell e-mails you when your tub needs something. Every reminder also appears under Notifications.">Notification settings</PageTitle>
      {d.saved && !errors && <Notice tone="ok">Your settings are saved.</Notice>}
      {errors?.form && <Notice tone="alert">{errors.form}</Notice>}
      <Form method="post" className="space-y-4">
        <Card className="space-y-3">
          <h2 className="text-lg font-bold">E-mails</h2>
          {(Object.entries(MESSAGE_KINDS) as [MessageKind, string][]).map(([kind, label]) => (
            <label key={kind} className="flex min-h-12 items-center gap-3">
              <input type="checkbox" name="kind" value={kind} defaultChecked={d.enabled.includes(kind)} className="size-6 accent-well-700" />
              <span>{label}</span>
            </label>
          ))}
          <p className="text-sm text-ink-soft">Messages about your account (confirming your address, resetting your password) always go.</p>
        </Card>
        <Card className="space-y-3">
          <h2 className="text-lg font-bold">Quiet hours</h2>
          <p className="text-ink-soft">A reminder that comes due in quiet hours waits until they end. Choose the same hour twice for no quiet hours.</p>
          <Field label="Time zone" hint={suggested ? "Your browser's time zone, chosen for you. Save the settings to keep it." : undefined} error={errors?.fields?.timeZone}>
            <Select key={zone} name="timeZone" defaultValue={zone}>
              {d.zones.map((z) => <option key={z} value={z}>{z.replace(/_/g, " ")}</option>)}
            </Select>
          </Field>
          <div className="grid gap-3 sm:grid-cols-2">
            <Field label="Quiet from" error={errors?.fields?.quietStartHour}>
              <Select name="quietStartHour" defaultValue={d.quietStartHour}>
                {HOURS.map((h) => <option key={h} value={h}>{hourLabel(h)}</option>)}
              </Select>
            </Field>
            <Field label="Quiet until" error={errors?.fields?.quietEndHour}>
              <Select name="quietEndHour" defaultValue={d.quietEndHour}>
                {HOURS.map((h) => <option key={h} value={h}>{hourLabel(h)}</option>)}
              </Select>
            </Field>
          </div>
        </Card>
        <Button type="submit">Save settings</Button>
      </Form>
    </div>
  );
}
