import { createRequire } from "node:module";
import type axeCore from "axe-core";
import type { Page } from "playwright-core";

// axe-core (Deque's accessibility rules engine, the pinned devDependency) injected into the page
// under test: it checks the rendered DOM against WCAG 2.x A/AA and best-practice rules.
const AXE_SCRIPT = createRequire(import.meta.url).resolve("axe-core/axe.min.js");

declare global {
  interface Window {
    axe?: typeof axeCore;
  }
}

/** One failed rule on one screen, short enough to read in a test failure. */
export interface AxeFinding {
  screen: string;
  rule: string;
  impact: string;
  help: string;
  targets: string[];
}

/** Every violation axe-core finds on the page as it is now (all rules, no exclusions). */
export async function axeFindings(page: Page, screen: string): Promise<AxeFinding[]> {
  // A refresh in flight (the upload screen refreshes its data after a verdict) re-renders the
  // head, and for a moment the document has no title: wait up to 5 s for a settled page. A page
  // that never gets a title still fails, on axe's document-title rule.
  await page
    .waitForFunction(() => document.title !== "", null, { timeout: 5000 })
    .catch(() => undefined);
  const loaded = await page.evaluate(() => window.axe !== undefined);
  if (!loaded) await page.addScriptTag({ path: AXE_SCRIPT });
  const violations = await page.evaluate(async () => {
    if (!window.axe) throw new Error("axe-core did not load");
    const result = await window.axe.run(document, { resultTypes: ["violations"] });
    return result.violations.map((v) => ({
      rule: v.id,
      impact: v.impact ?? "unknown",
      help: v.help,
      targets: v.nodes.map((n) => n.target.join(" ")),
    }));
  });
  return violations.map((v) => ({ screen, ...v }));
}

/** The widths every screen is checked at: a laptop and a phone. */
export const AXE_WIDTHS = [1366, 390] as const;

/** Runs axe-core at each width on the page as it stands (a resize re-lays the page, no reload). */
export async function axeAtWidths(page: Page, screen: string): Promise<AxeFinding[]> {
  const found: AxeFinding[] = [];
  const before = page.viewportSize() ?? { width: 1440, height: 900 };
  for (const width of AXE_WIDTHS) {
    await page.setViewportSize({ width, height: 900 });
    found.push(...(await axeFindings(page, `${screen} @${width}`)));
  }
  await page.setViewportSize(before);
  return found;
}

/** A readable list for the assertion message. */
export function describeFindings(found: AxeFinding[]): string {
  return found
    .map((f) => `${f.screen}: ${f.rule} (${f.impact}) ${f.help} — ${f.targets.join(", ")}`)
    .join("\n");
}
