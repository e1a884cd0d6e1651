/** Vehicle fields (VIN check digit rules live in the domain's vin.ts). */
import { z } from 'zod';
import { optionalText, requiredText, uuidRef } from './common';

const VIN = /^[A-HJ-NPR-Z0-9]{17}$/;

const vehicleFields = z.object({
	customerId: uuidRef.nullable().optional(),
	vin: z
		.string()
		.trim()
		.toUpperCase()
		.transform((v) => (v === '' ? null : v))
		.nullable()
		.optional()
		.refine((v) => v == null || VIN.test(v), {
			message: '17 characters: digits and capital letters except I, O and Q'
		}),
	chassisNo: optionalText(40),
	chassisReason: optionalText(200),
	plate: optionalText(20),
	make: requiredText(60, 'Enter the make'),
	model: requiredText(60, 'Enter the model'),
	year: z.number().int().min(1900).max(2100).nullable().optional(),
	engineCode: optionalText(30),
	odometer: z.number().int().min(0).max(5_000_000).nullable().optional(),
	odometerUnit: z.enum(['km', 'mi']).default('km'),
	hybrid: z.boolean().default(false)
});

export const vehicleCreate = vehicleFields
	.refine((v) => v.vin || v.chassisNo, {
		message: 'Enter the VIN or a chassis number',
		path: ['vin']
	})
	.refine((v) => !v.chassisNo || v.vin || v.chassisReason, {
		message: 'Say why there is no 17-character VIN',
		path: ['chassisReason']
	});

export const vehiclePatch = vehicleFields.partial();
