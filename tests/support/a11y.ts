// Accessibility checks in the browser with axe-core (injected into the page through
// playwright-core): WCAG 2.x A and AA rules; serious and critical findings fail a test.
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const require = createRequire(import.meta.url);
let source: string | null = null;
const axeSource = () => (source ??= readFileSync(require.resolve("axe-core/axe.min.js"), "utf8"));

/** The pinned devDependency. */
export const AXE_VERSION = "4.14.1";

export type AxeFinding = { id: string; impact: string; help: string; targets: string[] };

/** Runs axe on the page as it is now; returns the serious and critical findings. */
export async function axeFindings(page: Page): Promise<AxeFinding[]> {
  // Evaluated through the DevTools protocol: the app's nonce CSP refuses an injected <script>.
  if (!(await page.evaluate(() => "axe" in window))) await page.evaluate(axeSource());
  const found = await page.evaluate(async () => {
    type Result = { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] };
    const axe = (window as unknown as { axe: { version: string; run: (ctx: Document, opts: unknown) => Promise<{ violations: Result[]; passes: Result[] }> } }).axe;
    const r = await axe.run(document, { runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa", "best-practice"] }, resultTypes: ["violations"] });
    return {
      version: axe.version,
      passes: r.passes.length,
      violations: r.violations.map((v) => ({ id: v.id, impact: v.impact ?? "", help: v.help, targets: v.nodes.slice(0, 5).map((n) => String(n.target.join(" "))) })),
    };
  });
  // A sweep that ran no rule would pass anything: make sure axe itself ran on the page.
  if (found.version !== AXE_VERSION || found.passes === 0) throw new Error(`axe-core ${AXE_VERSION} did not run on ${page.url()} (version ${found.version}, ${found.passes} rules passed)`);
  return found.violations.filter((f) => f.impact === "serious" || f.impact === "critical");
}

export function describeFindings(where: string, findings: AxeFinding[]) {
  return findings.map((f) => `${where}: ${f.impact} ${f.id} (${f.help}) at ${f.targets.join(", ")}`).join("\n");
}
