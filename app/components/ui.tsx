// Dipwell's small set of building blocks. Large touch targets, plain words.
// Forms have Dipwell's own look: a soft "basin" around each answer, the label and a
// ripple mark above the box, tips under it, and a calm note (not an alarm) when
// something needs another look.
import { cloneElement, Fragment, isValidElement, useId, type ComponentProps, type ReactElement, type ReactNode } from "react";

export function cx(...parts: (string | false | null | undefined)[]) {
  return parts.filter(Boolean).join(" ");
}

export function Card({ className, ...props }: ComponentProps<"section">) {
  return <section className={cx("dw-card", className)} {...props} />;
}

export function PageTitle({ children, sub }: { children: ReactNode; sub?: ReactNode }) {
  return (
    <div className="mb-5">
      <h1 className="text-2xl font-bold text-well-900 sm:text-3xl">{children}</h1>
      {sub && <p className="mt-1 text-ink-soft">{sub}</p>}
    </div>
  );
}

const buttonStyles = {
  primary: "bg-well-700 text-white shadow-[0_2px_0_0_var(--color-well-900)] hover:bg-well-900 disabled:bg-well-500 disabled:shadow-none",
  secondary: "border-2 border-well-100 text-well-900 bg-shell hover:border-well-500 hover:bg-well-50",
  quiet: "text-well-700 hover:bg-well-50",
  danger: "bg-alert text-white hover:opacity-90",
} as const;

export function Button({ variant = "primary", className, ...props }: ComponentProps<"button"> & { variant?: keyof typeof buttonStyles }) {
  return (
    <button
      className={cx("inline-flex min-h-12 items-center justify-center gap-2 rounded-full px-6 font-bold transition disabled:cursor-not-allowed", buttonStyles[variant], className)}
      {...props}
    />
  );
}

export function ButtonLink({ variant = "primary", className, ...props }: ComponentProps<"a"> & { variant?: keyof typeof buttonStyles }) {
  return (
    <a
      className={cx("inline-flex min-h-12 items-center justify-center gap-2 rounded-full px-6 font-bold no-underline transition", buttonStyles[variant], className)}
      {...props}
    />
  );
}

/** The small ripple that marks a question in Dipwell's forms. */
function Ripple() {
  return (
    <svg width="18" height="10" viewBox="0 0 18 10" aria-hidden="true" className="shrink-0 text-well-500">
      <path d="M1 5c2-3 4-3 5.3 0s3.4 3 5.4 0 3.3-3 5.3 0" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
    </svg>
  );
}

/**
 * One question of a form. The label sits above the box, the tip below it; a problem replaces
 * nothing (what was typed stays) and is said under the box, which is marked too.
 */
export function Field({ label, hint, error, optional, children }: { label: string; hint?: ReactNode; error?: string; optional?: boolean; children: ReactNode }) {
  const id = useId();
  const hintId = hint ? `${id}-tip` : undefined;
  const errorId = error ? `${id}-problem` : undefined;
  const describedBy = [errorId, hintId].filter(Boolean).join(" ") || undefined;
  const control = isValidElement(children) && children.type !== Fragment
    ? cloneElement(children as ReactElement<Record<string, unknown>>, { "aria-invalid": error ? true : undefined, "aria-describedby": describedBy })
    : children;
  return (
    <div className="dw-field" data-invalid={error ? "" : undefined}>
      <label className="block">
        <span className="flex items-center gap-2 text-well-900">
          <Ripple />
          <span className="font-bold">{label}</span>
          {optional && <span className="text-sm text-ink-soft">(if you like)</span>}
        </span>
        <span className="mt-1.5 block">{control}</span>
      </label>
      {error && (
        <p id={errorId} role="alert" className="mt-1.5 flex items-start gap-1.5 text-sm font-bold text-alert">
          <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 shrink-0">
            <path d="M8 1.5c2.6 3.2 4.5 5.6 4.5 8a4.5 4.5 0 0 1-9 0c0-2.4 1.9-4.8 4.5-8z" fill="currentColor" />
            <path d="M8 6.2v3.2M8 11.4v.01" stroke="#fff" strokeWidth="1.8" strokeLinecap="round" />
          </svg>
          <span>{error}</span>
        </p>
      )}
      {hint && (
        <p id={hintId} className="mt-1.5 text-sm text-ink-soft">
          {hint}
        </p>
      )}
    </div>
  );
}

export const inputClass =
  "w-full min-h-12 rounded-2xl border-2 border-well-100 bg-shell px-4 text-ink shadow-[inset_0_2px_3px_rgba(10,59,54,0.07)] placeholder:text-ink-soft focus:border-well-700 focus:outline-none focus:ring-4 focus:ring-well-100";

export function Input(props: ComponentProps<"input">) {
  return <input {...props} className={cx(inputClass, props.className)} />;
}

export function Select(props: ComponentProps<"select">) {
  return <select {...props} className={cx(inputClass, props.className)} />;
}

export function TextArea(props: ComponentProps<"textarea">) {
  return <textarea {...props} className={cx(inputClass, "py-3", props.className)} />;
}

/** The link back up to where the person came from: the place's name with a return arrow. */
export function BackLink({ href, children }: { href: string; children: ReactNode }) {
  return (
    <a href={href} data-testid="back-link" className="inline-flex min-h-10 items-center gap-1.5 rounded-full bg-well-50 py-1 pl-2.5 pr-3.5 text-sm font-bold text-well-900 no-underline hover:bg-well-100">
      <svg width="16" height="16" viewBox="0 0 16 16" aria-hidden="true" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round">
        <path d="M6 3.5 2.5 7 6 10.5" />
        <path d="M2.5 7h6.5a4 4 0 0 1 4 4v1.5" />
      </svg>
      <span className="sr-only">Return to </span>
      {children}
    </a>
  );
}

const NOTICE_ICONS = {
  info: <path d="M8 1.5c2.6 3.2 4.5 5.6 4.5 8a4.5 4.5 0 0 1-9 0c0-2.4 1.9-4.8 4.5-8z" />,
  ok: <><circle cx="8" cy="8" r="6.5" /><path d="M5 8.2l2 2 4-4.4" /></>,
  caution: <><path d="M8 1.8 14.5 13.5h-13z" /><path d="M8 6.2v3.4M8 11.4v.01" /></>,
  alert: <><path d="M8 1.5c2.6 3.2 4.5 5.6 4.5 8a4.5 4.5 0 0 1-9 0c0-2.4 1.9-4.8 4.5-8z" /><path d="M8 6.4v3M8 11.4v.01" /></>,
} as const;

/** A message on a page: a soft tinted card with its own icon; problems are announced. */
export function Notice({ tone = "info", children, className }: { tone?: "info" | "ok" | "caution" | "alert"; children: ReactNode; className?: string }) {
  const styles = {
    info: "bg-well-50 text-well-900",
    ok: "bg-ok-soft text-ok",
    caution: "bg-caution-soft text-caution",
    alert: "bg-alert-soft text-alert",
  }[tone];
  return (
    <div role={tone === "alert" ? "alert" : "status"} data-tone={tone} className={cx("flex items-start gap-3 rounded-2xl px-4 py-3", styles, className)}>
      <svg width="20" height="20" viewBox="0 0 16 16" aria-hidden="true" className="mt-0.5 shrink-0" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" strokeLinejoin="round">
        {NOTICE_ICONS[tone]}
      </svg>
      <div className="min-w-0 flex-1">{children}</div>
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
