/**
 * Vehicle fields. The VIN is checked with the measurement engine's `validateVin`
 * (domain/vin.ts): its errors refuse the value, a check digit that does not match is only a
 * warning (`vinWarnings`), shown and accepted. Without a VIN, a short chassis number needs a
 * reason (older or imported vehicles).
 */
import { z } from 'zod';
import { normalizeVin, validateVin } from '../domain/vin';
import {
	formBool,
	formNumber,
	formRef,
	formText,
	optionalText,
	pageParam,
	pageSizeParam,
	requiredText,
	searchParam,
	sortParam,
	uuidRef,
	patchOf
} from './common';

const vin = z
	.string()
	.transform(normalizeVin)
	.transform((v) => (v === '' ? null : v))
	.nullable()
	.optional()
	.superRefine((v, ctx) => {
		if (v == null) return;
		const r = validateVin(v);
		if (!r.valid) ctx.addIssue({ code: 'custom', message: r.errors.join(' ') });
	});

/** Years a vehicle can carry (first cars to a little ahead of today). */
const year = z
	.number({ error: 'A year like 2019' })
	.int('A year like 2019')
	.min(1900, 'A year from 1900 on')
	.max(2100, 'A year before 2100');

export const vehicleFields = z.object({
	customerId: uuidRef.nullable().optional(),
	vin,
	chassisNo: optionalText(40),
	chassisReason: optionalText(200),
	plate: optionalText(20),
	make: requiredText(60, 'Enter the make'),
	model: requiredText(60, 'Enter the model'),
	year: year.nullable().optional(),
	engineCode: optionalText(30),
	cylinders: z
		.number({ error: 'Number of cylinders, like 4' })
		.int('Number of cylinders, like 4')
		.min(1, 'At least 1 cylinder')
		.max(16, 'At most 16 cylinders')
		.nullable()
		.optional(),
	odometer: z
		.number({ error: 'Whole kilometres or miles' })
		.int('Whole kilometres or miles')
		.min(0, 'Not below 0')
		.max(5_000_000, 'At most 5,000,000')
		.nullable()
		.optional(),
	odometerUnit: z.enum(['km', 'mi'], { error: 'km or mi' }).default('km'),
	hybrid: z.boolean().default(false)
});

type Identity = { vin?: string | null; chassisNo?: string | null; chassisReason?: string | null };

/** What is missing to identify a vehicle: a VIN, or a chassis number with its reason. */
export function findIdentityProblems(v: Identity): Record<string, string> {
	if (!v.vin && !v.chassisNo) return { vin: 'Enter the VIN, or a chassis number with the reason' };
	if (!v.vin && !v.chassisReason) return { chassisReason: 'Say why there is no 17-character VIN' };
	return {};
}

export const vehicleCreate = vehicleFields.superRefine((v, ctx) => {
	for (const [path, message] of Object.entries(findIdentityProblems(v)))
		ctx.addIssue({ code: 'custom', path: [path], message });
});

/** A patch; the identity rule is checked on the record it would produce (see the service). */
export const vehiclePatch = patchOf(vehicleFields);

/** Doubts about a VIN that do not refuse it (a check digit that does not match). */
export function vinWarnings(value: string | null | undefined): string[] {
	return value ? validateVin(value).warnings : [];
}

export const VEHICLE_SORTS = ['plate', 'make', 'year', 'created', 'updated'] as const;

/** `GET /api/vehicles` query: search, owner and hybrid/EV filters, sort, paging. */
export const vehicleListQuery = z.object({
	q: searchParam,
	customer: uuidRef.optional(),
	hybrid: z.enum(['yes', 'no'], { error: 'yes or no' }).optional(),
	sort: sortParam(VEHICLE_SORTS, '-updated'),
	page: pageParam,
	pageSize: pageSizeParam()
});
export type VehicleListQuery = z.output<typeof vehicleListQuery>;

/** The vehicle form's fields as the schema's input. */
export function readVehicleForm(fd: FormData) {
	return {
		customerId: formRef(fd, 'customerId'),
		vin: formText(fd, 'vin'),
		chassisNo: formText(fd, 'chassisNo'),
		chassisReason: formText(fd, 'chassisReason'),
		plate: formText(fd, 'plate'),
		make: formText(fd, 'make'),
		model: formText(fd, 'model'),
		year: formNumber(fd, 'year'),
		engineCode: formText(fd, 'engineCode'),
		cylinders: formNumber(fd, 'cylinders'),
		odometer: formNumber(fd, 'odometer'),
		odometerUnit: formText(fd, 'odometerUnit') || 'km',
		hybrid: formBool(fd, 'hybrid')
	};
}
