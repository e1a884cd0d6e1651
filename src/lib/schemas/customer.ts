/** Customer fields, validated the same way in forms, the JSON API and sync. */
import { z } from 'zod';
import {
	formBool,
	formText,
	patchOf,
	pageParam,
	pageSizeParam,
	searchParam,
	sortParam
} from './common';

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

export const customerPatch = patchOf(customerCreate);

export type CustomerCreate = z.input<typeof customerCreate>;
export type CustomerFields = z.output<typeof customerCreate>;

export const CUSTOMER_SORTS = ['name', 'created', 'updated'] as const;

/** `GET /api/customers` query: search (name, phone, e-mail), consent filter, sort, paging. */
export const customerListQuery = z.object({
	q: searchParam,
	consent: z.enum(['yes', 'no'], { error: 'yes or no' }).optional(),
	sort: sortParam(CUSTOMER_SORTS, 'name'),
	page: pageParam,
	pageSize: pageSizeParam()
});
export type CustomerListQuery = z.output<typeof customerListQuery>;

/** The customer form's fields as the schema's input. */
export function readCustomerForm(fd: FormData) {
	return {
		name: formText(fd, 'name'),
		phone: formText(fd, 'phone'),
		email: formText(fd, 'email'),
		reportConsent: formBool(fd, 'reportConsent')
	};
}
