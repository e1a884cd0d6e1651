import { describe, expect, it } from 'vitest';
import { customerCreate } from '../../../src/lib/schemas/customer';

describe('customer fields', () => {
	it('trim the name and turn an empty e-mail into no e-mail', () => {
		const r = customerCreate.parse({ name: '  Hana Lowe ', email: '' });
		expect(r).toEqual({ name: 'Hana Lowe', email: null, reportConsent: false });
	});

	it.each([
		[{ name: '' }, 'name'],
		[{ name: 'A', email: 'not-an-address' }, 'email'],
		[{ name: 'A', phone: 'call me' }, 'phone'],
		[{ name: 'x'.repeat(121) }, 'name']
	])('refuse %j naming the field %s', (input, field) => {
		const r = customerCreate.safeParse(input);
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path).toEqual([field]);
	});
});
