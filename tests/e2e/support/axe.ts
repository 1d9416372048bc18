/** axe-core in a browser test page: its WCAG 2.1 A/AA rules, read from node_modules (nothing is downloaded). */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');

interface Violation {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: string[]; failureSummary?: string }[];
}

/** axe-core's serious and critical WCAG 2.1 A/AA violations on the page as it is, one line each. */
export async function seriousViolations(page: Page): Promise<string[]> {
  // Injected through the debugging protocol, so the page's script policy does not apply; nothing is downloaded.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(AXE_SOURCE);
  const violations = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: unknown) => Promise<{ violations: unknown[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] }, resultTypes: ['violations'] });
    return result.violations;
  });
  return (violations as Violation[])
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => {
      const where = v.nodes.map((n) => n.target.join(' ')).slice(0, 4).join(', ');
      // The first node's reason (for contrast: the colours and the ratio found) says what to change.
      const why = (v.nodes[0]?.failureSummary ?? '').replace(/\s+/g, ' ').slice(0, 240);
      return `${v.id} (${v.impact}): ${v.help} at ${where}. ${why}`;
    });
}
