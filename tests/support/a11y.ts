// Accessibility checks in the browser with axe-core (injected into the page through
// playwright-core): WCAG 2.x A and AA rules; serious and critical findings fail a test.
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const require = createRequire(import.meta.url);
let source: string | null = null;
const axeSource = () => (source ??= readFileSync(require.resolve("axe-core/axe.min.js"), "utf8"));

export type AxeFinding = { id: string; impact: string; help: string; targets: string[] };

/** Runs axe on the page as it is now; returns the serious and critical findings. */
export async function axeFindings(page: Page): Promise<AxeFinding[]> {
  if (!(await page.evaluate(() => "axe" in window))) await page.addScriptTag({ content: axeSource() });
  const found = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: unknown) => Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[] }[] }[] }> } }).axe;
    const r = await axe.run(document, { runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa", "best-practice"] }, resultTypes: ["violations"] });
    return r.violations.map((v) => ({ id: v.id, impact: v.impact ?? "", help: v.help, targets: v.nodes.slice(0, 5).map((n) => String(n.target.join(" "))) }));
  });
  return found.filter((f) => f.impact === "serious" || f.impact === "critical");
}

export function describeFindings(where: string, findings: AxeFinding[]) {
  return findings.map((f) => `${where}: ${f.impact} ${f.id} (${f.help}) at ${f.targets.join(", ")}`).join("\n");
}
