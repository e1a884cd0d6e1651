/** axe-core's WCAG rules, run in the page (the engine is injected from node_modules). */
import { createRequire } from 'node:module';
import type { AxeResults } from 'axe-core';
import type { Page } from 'playwright-core';

const AXE = createRequire(import.meta.url).resolve('axe-core/axe.min.js');

/** WCAG 2.0, 2.1 and 2.2, levels A and AA. */
export const WCAG_AA = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22a', 'wcag22aa'];

/** The rules the page breaks: rule id, impact and the elements, empty when it passes. */
export async function axeViolations(page: Page): Promise<string[]> {
	await page.addScriptTag({ path: AXE });
	const results = await page.evaluate(
		(tags) =>
			(window as unknown as { axe: { run: (...a: unknown[]) => Promise<AxeResults> } }).axe.run(
				document,
				{ runOnly: { type: 'tag', values: tags }, resultTypes: ['violations'] }
			),
		WCAG_AA
	);
	return results.violations.map(
		(v) => `${v.id} (${v.impact}): ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`
	);
}
