import { AuthFrame } from "~/components/ui";
import type { Route } from "./+types/check-email";

export const meta: Route.MetaFunction = () => [{ title: "Check your e-mail · Dipwell" }];

export function loader({ request }: Route.LoaderArgs) {
  return { email: new URL(request.url).searchParams.get("email") ?? "your address" };
}

export default function CheckEmail({ loaderData }: Route.ComponentProps) {
  return (
    <AuthFrame title="Check your e-mail">
      <p>
        We sent a confirmation link to <strong>{loaderData.email}</strong>. Open it to finish creating your account.
      </p>
      <p className="mt-3 text-ink-soft">No message after a few minutes? Look in your spam folder, or sign in again to get a new link.</p>
      <a href="/sign-in" className="mt-5 inline-block font-bold text-well-700 underline">Back to sign in</a>
    </AuthFrame>
  );
}
