import { useEffect } from "react";
import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import { availabilityMiddleware } from "./lib/availability.server";
import { dateSettingsFor, rememberBrowserZone } from "./lib/dates";
import { useNonce } from "./lib/nonce";
import { sessionMiddleware } from "./lib/session.server";
import { bodyLimitMiddleware, securityMiddleware } from "./lib/web-security.server";
import "./app.css";

export const middleware: Route.MiddlewareFunction[] = [securityMiddleware, availabilityMiddleware, sessionMiddleware, bodyLimitMiddleware];

/** The user's locale and time zone for dates (app/lib/dates.ts). */
export function loader({ request }: Route.LoaderArgs) {
  return { dates: dateSettingsFor(request) };
}

export const meta: Route.MetaFunction = () => [
  { title: "Dipwell · hot tub water care" },
  { name: "description", content: "Read your hot tub test strips from a photo and get the next safe step." },
];

export const links: Route.LinksFunction = () => [
  { rel: "icon", href: "/favicon.svg", type: "image/svg+xml" },
  { rel: "manifest", href: "/manifest.webmanifest" },
  { rel: "apple-touch-icon", href: "/icons/apple-touch-icon.png" },
];

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="theme-color" content="#0f5c54" />
        <meta name="mobile-web-app-capable" content="yes" />
        <meta name="apple-mobile-web-app-title" content="Dipwell" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App() {
  useEffect(rememberBrowserZone, []);
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "Please try again in a moment. If it keeps happening, tell us what you were doing.";
  let stack: string | undefined;
  if (isRouteErrorResponse(error)) {
    const message = (error.data as { message?: string } | undefined)?.message;
    if (error.status === 404) {
      title = "Not found";
      detail = message ?? "We could not find that page.";
    } else if (error.status === 503) {
      title = "Back in a moment";
      detail = message ?? detail;
    } else if (error.status === 403) {
      title = "Not allowed";
      detail = message ?? "Your account cannot open this page.";
    } else {
      title = `Error ${error.status}`;
      detail = message ?? error.statusText ?? detail;
    }
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
    stack = error.stack;
  }
  return (
    <main className="mx-auto max-w-xl p-6">
      <div className="rounded-card border border-line bg-shell p-6">
        <h1 className="text-2xl font-bold text-well-900">{title}</h1>
        <p className="mt-2 text-ink-soft">{detail}</p>
        <a className="mt-4 inline-block font-bold text-well-700 underline" href="/tubs">
          Back to your tubs
        </a>
        {stack && <pre className="mt-4 overflow-x-auto text-xs">{stack}</pre>}
      </div>
    </main>
  );
}
