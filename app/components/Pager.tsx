// "Page 2 of 9" with links to the pages before and after, keeping the other parameters.
export function Pager({ page, pages, href, label = "Pages" }: { page: number; pages: number; href: (page: number) => string; label?: string }) {
  if (pages <= 1) return null;
  return (
    <nav aria-label={label} className="flex items-center justify-between gap-3">
      {page > 1 ? <a href={href(page - 1)} rel="prev">← Previous page</a> : <span />}
      <span className="text-ink-soft">Page {page} of {pages}</span>
      {page < pages ? <a href={href(page + 1)} rel="next">Next page →</a> : <span />}
    </nav>
  );
}

/** The current address with some parameters changed (null removes one). */
export function withParams(search: Record<string, string | number | null | undefined>, changes: Record<string, string | number | null>) {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries({ ...search, ...changes })) if (v !== null && v !== undefined && v !== "") q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : "?";
}
