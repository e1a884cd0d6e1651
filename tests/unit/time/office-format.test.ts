/** The office pages' helpers follow the zone the layout sets (expected values: IANA tzdb via Intl, Rule EU). */
import { afterEach, describe, expect, it } from 'vitest';
import { dayOf, momentOf } from '../../../src/lib/components/office/format';
import { showTimesIn } from '../../../src/lib/components/office/shown-zone.svelte';

afterEach(() => showTimesIn(null));

describe('office date helpers', () => {
	it("show a moment in the workshop's zone, the zone named", () => {
		showTimesIn('Europe/London');
		// IANA tzdb via Intl: 14:05 UTC on 1 July 2026 is 15:05 BST in London.
		expect(momentOf('2026-07-01T14:05:00.000Z')).toBe('1 Jul 2026, 15:05 BST');
		showTimesIn('UTC');
		expect(momentOf('2026-07-01T14:05:00.000Z')).toBe('1 Jul 2026, 14:05 UTC');
	});

	it("give an instant's day in the zone, and a stored day as it is", () => {
		showTimesIn('Europe/London');
		// IANA tzdb via Intl: 23:30 UTC on 14 August 2026 is 00:30 BST on the 15th.
		expect(dayOf(new Date('2026-08-14T23:30:00Z'))).toBe('15 Aug 2026');
		showTimesIn('America/New_York');
		expect(dayOf('2026-08-15')).toBe('15 Aug 2026');
	});

	it('give nothing for no date', () => {
		expect(momentOf(null)).toBe('');
		expect(dayOf(undefined)).toBe('');
	});
});
