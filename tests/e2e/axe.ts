/**
 * Accessibility check with axe-core (pinned in package.json): the WCAG 2.0, 2.1 and 2.2
 * level A and AA rules. The engine is evaluated in the page through the DevTools protocol,
 * so a Content-Security-Policy that forbids inline scripts does not stop it.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import type { AxeResults, RunOptions } from 'axe-core';
import type { Page } from 'playwright-core';

const AXE = readFileSync(createRequire(import.meta.url).resolve('axe-core/axe.min.js'), 'utf8');
export const WCAG22_AA = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22a', 'wcag22aa'];

/** The rules broken on the page as it is now: `[]` when it passes. */
export async function axeViolations(page: Page): Promise<string[]> {
	if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(AXE);
	return page.evaluate(async (tags) => {
		type Axe = { run: (context: Document, options: RunOptions) => Promise<AxeResults> };
		const axe = (window as unknown as { axe: Axe }).axe;
		const r = await axe.run(document, { runOnly: { type: 'tag', values: tags } });
		return r.violations.map(
			(v) => `${v.id}: ${v.help} — ${v.nodes.map((n) => n.target.join(' ')).slice(0, 4).join(', ')}`
		);
	}, WCAG22_AA);
}
