/**
 * axe-core (from npm) in Chromium through playwright-core: `axeViolations(page)` runs the WCAG
 * 2.0–2.2 A and AA rules on the page as it is and answers the violations. The script is sent
 * over the DevTools protocol (page.evaluate), so the page's CSP needs no allowance for it.
 */
import { readFile } from "node:fs/promises";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

const require = createRequire(import.meta.url);
let source: string | undefined;

export type AxeViolation = { id: string; impact: string | null; help: string; nodes: { target: string[]; summary: string }[] };

export async function axeViolations(page: Page): Promise<AxeViolation[]> {
  source ??= await readFile(require.resolve("axe-core/axe.min.js"), "utf8");
  await page.evaluate(source);
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: unknown) => Promise<{ violations: Array<{ id: string; impact: string | null; help: string; nodes: Array<{ target: string[]; failureSummary?: string }> }> }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"] }, resultTypes: ["violations"] });
    return result.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.map((n) => ({ target: n.target, summary: n.failureSummary ?? "" })) }));
  });
}

/** Total failing nodes. */
export const nodeCount = (vs: AxeViolation[]) => vs.reduce((n, v) => n + v.nodes.length, 0);
