import { Form, redirect, useNavigation } from "react-router";
import { AuthFrame, Button, Field, Input, Notice } from "~/components/ui";
import { signIn, type FormErrors } from "~/lib/account.server";
import { optionalUser, safeRedirect } from "~/lib/session.server";
import type { Route } from "./+types/sign-in";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Dipwell" }];

export function loader({ context, request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  if (optionalUser(context)) throw redirect(safeRedirect(url.searchParams.get("redirectTo")));
  return { redirectTo: url.searchParams.get("redirectTo") ?? "", reset: url.searchParams.has("reset") };
}

export async function action({ request, context }: Route.ActionArgs) {
  return signIn(request, await request.formData(), context);
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const errors = actionData as FormErrors | undefined;
  const busy = useNavigation().state !== "idle";
  return (
    <AuthFrame title="Sign in">
      <p className="mb-4 text-ink-soft">Read your strips, see your water's next safe step.</p>
      {loaderData.reset && <Notice tone="ok" className="mb-4">Your password is changed. Sign in with the new one.</Notice>}
      {errors?.form && <Notice tone="alert" className="mb-4">{errors.form}</Notice>}
      <Form method="post" className="space-y-4">
        <input type="hidden" name="redirectTo" value={loaderData.redirectTo} />
        <Field label="E-mail address" error={errors?.fields?.email}>
          <Input name="email" type="email" autoComplete="email" required />
        </Field>
        <Field label="Password" error={errors?.fields?.password}>
          <Input name="password" type="password" autoComplete="current-password" required />
        </Field>
        <Button type="submit" className="w-full" disabled={busy}>
          {busy ? "Signing in…" : "Sign in"}
        </Button>
      </Form>
      <div className="mt-5 flex flex-wrap justify-between gap-2 text-well-700">
        <a href="/sign-up" className="font-bold underline">Create an account</a>
        <a href="/forgot-password" className="underline">Forgot your password?</a>
      </div>
    </AuthFrame>
  );
}
