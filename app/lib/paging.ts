// Pages of a list that grows with the business (clients, tubs, history, review queue,
// e-mail log, users). A page number that is missing, malformed or past the end gives
// the first page; nothing here throws on what a visitor typed into the address bar.

export type Page = { page: number; pages: number; total: number; offset: number; size: number };

/** The page the address asks for: a whole number from 1, else 1. */
export function askedPage(url: URL, name = "page"): number {
  const raw = url.searchParams.get(name);
  if (!raw || !/^\d{1,6}$/.test(raw.trim())) return 1;
  return Math.max(1, Number(raw.trim()));
}

/** Where a page starts once the total is known; a page past the end gives the first page. */
export function pageOf(total: number, size: number, asked: number): Page {
  const pages = Math.max(1, Math.ceil(total / size));
  const page = Number.isInteger(asked) && asked >= 1 && asked <= pages ? asked : 1;
  return { page, pages, total, offset: (page - 1) * size, size };
}

/** A search box's text: trimmed, at most 100 characters, empty when absent. */
export function searchText(url: URL, name = "q"): string {
  return (url.searchParams.get(name) ?? "").trim().slice(0, 100);
}

/** `%text%` for ILIKE with the text's own wildcards taken literally. */
export function likePattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

/** Stops a loader's work once the browser has gone away. */
export function stopIfAborted(signal: AbortSignal | undefined) {
  if (signal?.aborted) throw new Response(null, { status: 499, statusText: "Client closed request" });
}
