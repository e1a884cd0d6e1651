/** Customer fields, validated the same way in forms, the JSON API and sync. */
import { z } from 'zod';

const optionalText = (max: number) =>
	z
		.string()
		.trim()
		.max(max, `At most ${max} characters`)
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.optional();

export const customerCreate = z.object({
	name: z.string().trim().min(1, 'Enter the customer’s name').max(120, 'At most 120 characters'),
	phone: optionalText(40).refine((v) => v == null || /^[+0-9 ()/-]{4,40}$/.test(v), {
		message: 'Digits, spaces and + ( ) - / only'
	}),
	email: z
		.union([z.literal(''), z.email('Enter an e-mail address like name@example.com').max(254)])
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.optional(),
	reportConsent: z.boolean().default(false)
});

export const customerPatch = customerCreate.partial();

export type CustomerCreate = z.input<typeof customerCreate>;
export type CustomerFields = z.output<typeof customerCreate>;
