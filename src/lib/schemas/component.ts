/** Components and spec sheets (DESIGN §2.2). */
import { z } from 'zod';
import { optionalText, requiredText, uuidRef } from './common';

export const COMPONENT_KINDS = [
	'ignition_coil',
	'coil_pack',
	'injector',
	'crank_cam_sensor',
	'relay',
	'glow_plug',
	'heater_element',
	'other'
] as const;

export const fitment = z.object({
	make: requiredText(60, 'Enter the make'),
	model: requiredText(60, 'Enter the model'),
	yearFrom: z.number().int().min(1900).max(2100).nullable().optional(),
	yearTo: z.number().int().min(1900).max(2100).nullable().optional(),
	engineCode: optionalText(30)
});

export const packPosition = z.object({
	position: requiredText(10, 'Name the coil position'),
	cylinders: z.array(z.number().int().min(1).max(16)).min(1, 'Which cylinders does it serve?')
});

export const componentCreate = z.object({
	partNumber: requiredText(60, 'Enter the part number'),
	kind: z.enum(COMPONENT_KINDS),
	description: optionalText(300),
	fitment: z.array(fitment).max(100).default([]),
	cautions: z.array(z.enum(['airbag', 'high_voltage', 'hot_surface', 'fuel'])).default([]),
	positions: z.array(packPosition).max(16).default([])
});
export const componentPatch = componentCreate.partial();

export const QUANTITIES = [
	'resistance',
	'voltage',
	'voltage_drop',
	'current',
	'spark',
	'visual'
] as const;
export const CONDITIONS = ['key_off', 'key_on', 'cranking', 'idle', 'under_load'] as const;

export const band = z.object({
	fromC: z.number().nullable(),
	toC: z.number().nullable(),
	min: z.number().nullable(),
	max: z.number().nullable()
});

export const check = z.object({
	key: z.string().regex(/^[a-z0-9_]{1,40}$/, 'Lower-case letters, digits and _'),
	label: requiredText(120, 'Name the check'),
	quantity: z.enum(QUANTITIES),
	from: optionalText(30),
	to: optionalText(30),
	condition: z.enum(CONDITIONS),
	rangeHint: optionalText(30),
	unit: z.string().max(4),
	openOk: z.boolean().default(false),
	bands: z.array(band).max(6)
});

export const sheetCreate = z.object({
	componentId: uuidRef,
	checks: z.array(check).min(1, 'Add at least one check').max(40),
	source: z
		.object({ document: optionalText(200), section: optionalText(60), page: optionalText(20) })
		.nullable()
		.optional()
});
export const sheetPatch = sheetCreate.omit({ componentId: true }).partial();
