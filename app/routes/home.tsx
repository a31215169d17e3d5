import { redirect } from "react-router";
import { optionalUser } from "~/lib/session.server";
import type { Route } from "./+types/home";

export function loader({ context }: Route.LoaderArgs) {
  throw redirect(optionalUser(context) ? "/tubs" : "/sign-in");
}
