// The app's route table, flattened: every URL pattern with the module that serves it.
import routes from "~/routes";

export type FlatRoute = { path: string; file: string; underSignedInLayout: boolean };

type Entry = { path?: string; file: string; index?: boolean; children?: Entry[] };

export function flatRoutes(): FlatRoute[] {
  const out: FlatRoute[] = [];
  const walk = (entries: Entry[], prefix: string, signedIn: boolean) => {
    for (const e of entries) {
      const path = e.path ? `${prefix}/${e.path}`.replace(/\/+/g, "/") : prefix || "/";
      const isLayout = e.file.includes("signed-in-layout");
      if (!isLayout) out.push({ path, file: e.file, underSignedInLayout: signedIn });
      if (e.children) walk(e.children, e.path ? path : prefix, signedIn || isLayout);
    }
  };
  walk(routes as unknown as Entry[], "", false);
  return out;
}

/** Imports a route module by its file name in app/routes.ts. */
export async function importRoute(file: string): Promise<{ loader?: (a: unknown) => unknown; action?: (a: unknown) => unknown }> {
  const modules = import.meta.glob("../../app/routes/**/*.{ts,tsx}");
  const key = `../../app/${file}`;
  const load = modules[key];
  if (!load) throw new Error(`route module not found: ${file}`);
  return (await load()) as { loader?: (a: unknown) => unknown; action?: (a: unknown) => unknown };
}
