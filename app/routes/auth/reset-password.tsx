import { Form, redirect, useNavigation } from "react-router";
import { AuthFrame, Button, Field, Input, Notice } from "~/components/ui";
import { resetPassword, type FormErrors } from "~/lib/account.server";
import type { Route } from "./+types/reset-password";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Dipwell" }];

export function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  return { token: url.searchParams.get("token") ?? "", invalid: url.searchParams.get("error") === "INVALID_TOKEN" };
}

export async function action({ request }: Route.ActionArgs) {
  const result = await resetPassword(await request.formData());
  if ("done" in result) throw redirect("/sign-in?reset=1");
  return result;
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const errors = actionData as FormErrors | undefined;
  const busy = useNavigation().state !== "idle";
  if (loaderData.invalid || !loaderData.token) {
    return (
      <AuthFrame title="This link does not work">
        <p>The reset link has expired or was used already.</p>
        <a href="/forgot-password" className="mt-4 inline-block font-bold text-well-700 underline">Ask for a new link</a>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title="Choose a new password">
      {errors?.form && <Notice tone="alert" className="mb-4">{errors.form}</Notice>}
      <Form method="post" className="space-y-4">
        <input type="hidden" name="token" value={loaderData.token} />
        <Field label="New password" hint="At least 8 characters" error={errors?.fields?.password ?? errors?.fields?.token}>
          <Input name="password" type="password" autoComplete="new-password" minLength={8} required />
        </Field>
        <Button type="submit" className="w-full" disabled={busy}>Save the new password</Button>
      </Form>
    </AuthFrame>
  );
}
