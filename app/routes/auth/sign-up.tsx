import { Form, redirect, useNavigation } from "react-router";
import { AuthFrame, Button, Field, Input, Notice } from "~/components/ui";
import { signUp, type FormErrors } from "~/lib/account.server";
import { optionalUser } from "~/lib/session.server";
import type { Route } from "./+types/sign-up";

export const meta: Route.MetaFunction = () => [{ title: "Create an account · Dipwell" }];

export function loader({ context }: Route.LoaderArgs) {
  if (optionalUser(context)) throw redirect("/tubs");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  return signUp(request, await request.formData());
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const errors = actionData as FormErrors | undefined;
  const busy = useNavigation().state !== "idle";
  return (
    <AuthFrame title="Create your account">
      <p className="mb-4 text-ink-soft">We will send you an e-mail to confirm your address.</p>
      {errors?.form && <Notice tone="alert" className="mb-4">{errors.form}</Notice>}
      <Form method="post" className="space-y-4">
        <Field label="Your name" error={errors?.fields?.name}>
          <Input name="name" autoComplete="name" required />
        </Field>
        <Field label="E-mail address" error={errors?.fields?.email}>
          <Input name="email" type="email" autoComplete="email" required />
        </Field>
        <Field label="Password" hint="At least 8 characters" error={errors?.fields?.password}>
          <Input name="password" type="password" autoComplete="new-password" minLength={8} required />
        </Field>
        <Button type="submit" className="w-full" disabled={busy}>
          {busy ? "Creating…" : "Create account"}
        </Button>
      </Form>
      <p className="mt-5 text-well-700">
        Have an account? <a href="/sign-in" className="font-bold underline">Sign in</a>
      </p>
    </AuthFrame>
  );
}
