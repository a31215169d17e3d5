import { Form, useNavigation } from "react-router";
import { AuthFrame, Button, Field, Input, Notice } from "~/components/ui";
import { requestPasswordReset, type FormErrors } from "~/lib/account.server";
import type { Route } from "./+types/forgot-password";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Dipwell" }];

export async function action({ request }: Route.ActionArgs) {
  return requestPasswordReset(request, await request.formData());
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const result = actionData as (FormErrors & { sent?: boolean }) | undefined;
  const busy = useNavigation().state !== "idle";
  return (
    <AuthFrame title="Reset your password">
      {result?.sent ? (
        <Notice tone="ok">If an account uses that address, a reset link is on its way. It works for one hour.</Notice>
      ) : (
        <Form method="post" className="space-y-4">
          <p className="text-ink-soft">Enter your e-mail address and we will send you a link to choose a new password.</p>
          <Field label="E-mail address" error={result?.fields?.email}>
            <Input name="email" type="email" autoComplete="email" required />
          </Field>
          <Button type="submit" className="w-full" disabled={busy}>Send the reset link</Button>
        </Form>
      )}
      <a href="/sign-in" className="mt-5 inline-block text-well-700 underline">Back to sign in</a>
    </AuthFrame>
  );
}
