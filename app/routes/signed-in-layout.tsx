import { Form, NavLink, Outlet } from "react-router";
import { NAV_ITEMS } from "~/components/nav";
import { cx } from "~/components/ui";
import { unreadCount } from "~/features/notify/notifications.server";
import { can } from "~/lib/permissions";
import { requireUser } from "~/lib/session.server";
import type { Route } from "./+types/signed-in-layout";

export const middleware: Route.MiddlewareFunction[] = [
  ({ context, request }) => void requireUser(context, request),
];

export async function loader({ context, request }: Route.LoaderArgs) {
  const user = requireUser(context, request);
  return {
    user: { id: user.id, name: user.name, email: user.email, role: user.role ?? "owner" },
    unread: await unreadCount(user.id),
  };
}

export default function SignedInLayout({ loaderData }: Route.ComponentProps) {
  const { user, unread } = loaderData;
  const items = NAV_ITEMS.filter((i) => !i.need || can(user, i.need));
  return (
    <div className="min-h-screen">
      <a href="#main" className="dw-skip">Skip to the page content</a>
      <header className="sticky top-0 z-10 border-b border-line bg-shell/95 backdrop-blur">
        <div className="mx-auto flex max-w-5xl flex-wrap items-center gap-x-4 gap-y-1 px-4 py-2">
          <a href="/tubs" className="flex items-center gap-2 text-well-700 no-underline">
            <img src="/favicon.svg" alt="" width={28} height={28} />
            <span className="text-xl font-bold">Dipwell</span>
          </a>
          <nav aria-label="Main" className="order-3 -mx-2 flex w-full flex-wrap gap-x-1 sm:order-none sm:mx-0 sm:w-auto">
            {items.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                className={({ isActive }) =>
                  cx("whitespace-nowrap rounded-lg px-2 py-1.5 font-bold no-underline sm:px-3 sm:py-2", isActive ? "bg-well-50 text-well-900" : "text-ink-soft hover:text-well-700")
                }
              >
                {item.label}
                {item.to === "/notifications" && unread > 0 && (
                  <span className="ml-1.5 rounded-full bg-alert px-2 py-0.5 text-xs text-white" aria-label={`${unread} unread`}>
                    {unread > 99 ? "99+" : unread}
                  </span>
                )}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <span className="hidden text-sm text-ink-soft sm:inline" data-testid="signed-in-as">
              {user.name} · {user.role}
            </span>
            <Form method="post" action="/sign-out">
              <button className="rounded-lg px-3 py-2 text-sm font-bold text-well-700 hover:bg-well-50">Sign out</button>
            </Form>
          </div>
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto max-w-5xl px-4 py-6 focus:outline-none">
        <Outlet />
      </main>
    </div>
  );
}
