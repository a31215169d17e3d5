// Dipwell's small set of building blocks. Large touch targets, plain words.
import type { ComponentProps, ReactNode } from "react";

export function cx(...parts: (string | false | null | undefined)[]) {
  return parts.filter(Boolean).join(" ");
}

export function Card({ className, ...props }: ComponentProps<"section">) {
  return <section className={cx("rounded-card border border-line bg-shell p-5 shadow-sm", className)} {...props} />;
}

export function PageTitle({ children, sub }: { children: ReactNode; sub?: ReactNode }) {
  return (
    <header className="mb-5">
      <h1 className="text-2xl font-bold text-well-900 sm:text-3xl">{children}</h1>
      {sub && <p className="mt-1 text-ink-soft">{sub}</p>}
    </header>
  );
}

const buttonStyles = {
  primary: "bg-well-700 text-white hover:bg-well-900 disabled:bg-well-300",
  secondary: "border border-well-700 text-well-700 bg-shell hover:bg-well-50",
  quiet: "text-well-700 hover:bg-well-50",
  danger: "bg-alert text-white hover:opacity-90",
} as const;

export function Button({ variant = "primary", className, ...props }: ComponentProps<"button"> & { variant?: keyof typeof buttonStyles }) {
  return (
    <button
      className={cx("inline-flex min-h-12 items-center justify-center gap-2 rounded-xl px-5 font-bold transition disabled:cursor-not-allowed", buttonStyles[variant], className)}
      {...props}
    />
  );
}

export function ButtonLink({ variant = "primary", className, ...props }: ComponentProps<"a"> & { variant?: keyof typeof buttonStyles }) {
  return (
    <a
      className={cx("inline-flex min-h-12 items-center justify-center gap-2 rounded-xl px-5 font-bold no-underline transition", buttonStyles[variant], className)}
      {...props}
    />
  );
}

export function Field({ label, hint, error, children }: { label: string; hint?: ReactNode; error?: string; children: ReactNode }) {
  return (
    <label className="block">
      <span className="block font-bold">{label}</span>
      {hint && <span className="block text-sm text-ink-soft">{hint}</span>}
      <span className="mt-1 block">{children}</span>
      {error && <span role="alert" className="mt-1 block text-sm font-bold text-alert">{error}</span>}
    </label>
  );
}

export const inputClass =
  "w-full min-h-12 rounded-xl border border-line bg-white px-4 text-ink placeholder:text-ink-soft/70 focus:border-well-500 focus:outline-none";

export function Input(props: ComponentProps<"input">) {
  return <input className={cx(inputClass, props.className)} {...props} />;
}

export function Select(props: ComponentProps<"select">) {
  return <select className={cx(inputClass, props.className)} {...props} />;
}

export function Notice({ tone = "info", children, className }: { tone?: "info" | "ok" | "caution" | "alert"; children: ReactNode; className?: string }) {
  const styles = {
    info: "bg-well-50 border-well-100 text-well-900",
    ok: "bg-ok-soft border-ok/30 text-ok",
    caution: "bg-caution-soft border-caution/30 text-caution",
    alert: "bg-alert-soft border-alert/30 text-alert",
  }[tone];
  return (
    <div role={tone === "alert" ? "alert" : "status"} className={cx("rounded-xl border px-4 py-3", styles, className)}>
      {children}
    </div>
  );
}

export function EmptyState({ title, children, action }: { title: string; children?: ReactNode; action?: ReactNode }) {
  return (
    <Card className="text-center">
      <p className="text-lg font-bold text-well-900">{title}</p>
      {children && <div className="mt-1 text-ink-soft">{children}</div>}
      {action && <div className="mt-4">{action}</div>}
    </Card>
  );
}

/** The page frame of the sign-in screens: a calm card in the middle of the screen. */
export function AuthFrame({ title, children }: { title: string; children: ReactNode }) {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center px-4 py-8">
      <a href="/" className="mb-6 flex items-center gap-2 text-well-700 no-underline">
        <img src="/favicon.svg" alt="" width={36} height={36} />
        <span className="text-2xl font-bold">Dipwell</span>
      </a>
      <Card>
        <h1 className="mb-4 text-2xl font-bold text-well-900">{title}</h1>
        {children}
      </Card>
    </main>
  );
}
