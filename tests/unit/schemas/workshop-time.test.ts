import { describe, expect, it } from 'vitest';
import { workshopTimeSchema } from '../../../src/lib/schemas/workshop-time';

describe('the workshop time zone form', () => {
	it('take an IANA zone name, spaces trimmed', () => {
		expect(workshopTimeSchema.parse({ timeZone: ' Europe/London ' })).toEqual({
			timeZone: 'Europe/London'
		});
		expect(workshopTimeSchema.parse({ timeZone: 'UTC' })).toEqual({ timeZone: 'UTC' });
	});

	it('refuse a made-up zone with words a lead understands', () => {
		const r = workshopTimeSchema.safeParse({ timeZone: 'Atlantis/Harbour' });
		expect(r.success).toBe(false);
		expect(r.error?.issues[0].path).toEqual(['timeZone']);
		expect(r.error?.issues[0].message).toBe('Choose a time zone from the list, like Europe/London');
	});

	it('refuse an empty choice and a fixed offset that is not a zone', () => {
		expect(workshopTimeSchema.safeParse({ timeZone: '' }).error?.issues[0].message).toBe(
			'Choose the time zone the workshop is in'
		);
		expect(workshopTimeSchema.safeParse({ timeZone: '+01:00' }).success).toBe(false);
	});
});
