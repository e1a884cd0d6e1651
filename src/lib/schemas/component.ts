/**
 * Components and spec sheets (DESIGN §2.2), shared by the API, the sheet editor, the CSV
 * import and sync. Band limits are stored in SI base units (Ω, V, A, m); a check's `unit` is
 * the unit the figures are shown and typed in. Temperatures in °C; a band covers the
 * half-open range [fromC, toC), a null bound being unbounded on that side.
 */
import { z } from 'zod';
import { normalizeUnit } from '../domain/units';
import { temperatureRangeText } from '../library/band-words';
import {
	optionalText,
	pageParam,
	pageSizeParam,
	requiredText,
	searchParam,
	sortParam,
	uuidRef
} from './common';

export const COMPONENT_KINDS = [
	'ignition_coil',
	'coil_pack',
	'injector',
	'crank_cam_sensor',
	'relay',
	'glow_plug',
	'heater_element',
	'battery',
	'alternator',
	'other'
] as const;
export type ComponentKind = (typeof COMPONENT_KINDS)[number];

/** Cautions a component carries (DESIGN §8); `airbag` makes the capture flow refuse ohmmeter checks. */
export const CAUTIONS = ['airbag', 'high_voltage', 'hot_surface', 'fuel'] as const;
export type Caution = (typeof CAUTIONS)[number];

const oneOf = (codes: readonly string[]) => ({ error: `One of: ${codes.join(', ')}` });
const year = z
	.number({ error: 'A year like 2019' })
	.int('A year like 2019')
	.min(1900, 'A year from 1900')
	.max(2100, 'A year up to 2100')
	.nullable()
	.optional();

export const fitment = z
	.object({
		make: requiredText(60, 'Enter the make'),
		model: requiredText(60, 'Enter the model'),
		yearFrom: year,
		yearTo: year,
		engineCode: optionalText(30)
	})
	.superRefine((f, ctx) => {
		if (f.yearFrom != null && f.yearTo != null && f.yearTo < f.yearFrom)
			ctx.addIssue({ code: 'custom', path: ['yearTo'], message: 'Before the first year' });
	});

/** One coil of a pack and the cylinders it serves, as the user entered them (never inferred). */
export const packPosition = z
	.object({
		position: requiredText(10, 'Name the coil position'),
		cylinders: z
			.array(
				z
					.number({ error: 'Cylinder numbers like 1 4' })
					.int('Cylinder numbers like 1 4')
					.min(1, 'Cylinders count from 1')
					.max(16, 'At most cylinder 16')
			)
			.min(1, 'Which cylinders does it serve?')
			.max(8, 'At most 8 cylinders per coil')
	})
	.superRefine((p, ctx) => {
		if (new Set(p.cylinders).size !== p.cylinders.length)
			ctx.addIssue({ code: 'custom', path: ['cylinders'], message: 'A cylinder is listed twice' });
	});

const positions = z
	.array(packPosition)
	.max(16, 'At most 16 coil positions')
	.superRefine((list, ctx) => {
		const seen = new Set<string>();
		list.forEach((p, i) => {
			const k = p.position.toUpperCase();
			if (seen.has(k))
				ctx.addIssue({
					code: 'custom',
					path: [i, 'position'],
					message: 'Two coils have this name'
				});
			seen.add(k);
		});
	});

/** Fields of a component without defaults, so that a patch never resets what it did not send. */
const componentFields = z.object({
	partNumber: requiredText(60, 'Enter the part number'),
	kind: z.enum(COMPONENT_KINDS, oneOf(COMPONENT_KINDS)),
	description: optionalText(300),
	fitment: z.array(fitment).max(100, 'At most 100 vehicles'),
	cautions: z
		.array(z.enum(CAUTIONS, oneOf(CAUTIONS)))
		.max(CAUTIONS.length)
		.transform((list) => [...new Set(list)]),
	positions
});

export const componentCreate = componentFields.extend({
	fitment: componentFields.shape.fitment.default([]),
	cautions: componentFields.shape.cautions.default([]),
	positions: componentFields.shape.positions.default([])
});
export const componentPatch = componentFields.partial();
export type ComponentInput = z.input<typeof componentCreate>;

export const QUANTITIES = [
	'resistance',
	'voltage',
	'voltage_drop',
	'current',
	'spark',
	'visual'
] as const;
export type CheckQuantity = (typeof QUANTITIES)[number];
export const CONDITIONS = ['key_off', 'key_on', 'cranking', 'idle', 'under_load'] as const;
export type CheckCondition = (typeof CONDITIONS)[number];

/** The units a check of each quantity may use (the first is offered by default). */
export const UNITS_BY_QUANTITY: Readonly<Record<CheckQuantity, readonly string[]>> = {
	resistance: ['Ω', 'kΩ', 'mΩ', 'MΩ'],
	voltage: ['V', 'mV', 'kV'],
	voltage_drop: ['V', 'mV'],
	current: ['A', 'mA'],
	spark: ['kV', 'mm'],
	visual: []
};
/** Quantities judged against numeric limits (a spark check may carry limits; a visual one none). */
const NEEDS_LIMITS: readonly CheckQuantity[] = ['resistance', 'voltage', 'voltage_drop', 'current'];
const NEVER_NEGATIVE: readonly CheckQuantity[] = ['resistance', 'spark'];

const tempC = z
	.number({ error: 'A temperature in °C' })
	.min(-60, 'From −60 °C')
	.max(250, 'Up to 250 °C')
	.nullable()
	.default(null);
const limit = z.number({ error: 'A number' }).nullable().default(null);

/** Limits in base units for the temperatures [fromC, toC) (°C). */
export const band = z
	.object({ fromC: tempC, toC: tempC, min: limit, max: limit })
	.superRefine((b, ctx) => {
		if (b.fromC !== null && b.toC !== null && b.toC <= b.fromC)
			ctx.addIssue({
				code: 'custom',
				path: ['toC'],
				message: 'Must be above the “from” temperature'
			});
		if (b.min !== null && b.max !== null && b.min > b.max)
			ctx.addIssue({ code: 'custom', path: ['max'], message: 'Max is below min' });
	});
export type Band = z.output<typeof band>;

/** Index pairs [i, j] (j after i in temperature) of bands whose ranges overlap. */
export function overlappingBands(bands: readonly Band[]): [number, number][] {
	const lo = (b: Band) => b.fromC ?? -Infinity;
	const hi = (b: Band) => b.toC ?? Infinity;
	const out: [number, number][] = [];
	bands.forEach((a, i) =>
		bands.forEach((b, j) => {
			if (i >= j) return;
			if (lo(a) < hi(b) && lo(b) < hi(a)) out.push(lo(a) <= lo(b) ? [i, j] : [j, i]);
		})
	);
	return out;
}

const unitText = z
	.string()
	.trim()
	.max(8, 'At most 8 characters')
	.nullable()
	.default(null)
	.transform((u) => (u ? (normalizeUnit(u) ?? u) : null));

export const check = z
	.object({
		key: z
			.string({ error: 'Lower-case letters, digits and _' })
			.regex(/^[a-z0-9_]{1,40}$/, 'Lower-case letters, digits and _ (up to 40)'),
		label: requiredText(120, 'Name the check'),
		quantity: z.enum(QUANTITIES, oneOf(QUANTITIES)),
		from: optionalText(30),
		to: optionalText(30),
		condition: z.enum(CONDITIONS, oneOf(CONDITIONS)),
		rangeHint: optionalText(30),
		unit: unitText,
		openOk: z.boolean().default(false),
		bands: z.array(band).max(6, 'At most 6 temperature bands').default([]),
		/** A pack's coil (its position name) this check belongs to; null: every coil. */
		coil: optionalText(10)
	})
	.superRefine((c, ctx) => {
		const fits = UNITS_BY_QUANTITY[c.quantity];
		if (c.quantity === 'visual' && c.unit !== null)
			ctx.addIssue({ code: 'custom', path: ['unit'], message: 'A visual check has no unit' });
		if (c.quantity !== 'visual' && (c.unit === null || !fits.includes(c.unit)))
			ctx.addIssue({
				code: 'custom',
				path: ['unit'],
				message:
					c.unit === null
						? `Pick a unit: ${fits.join(' ')}`
						: `${c.unit} does not fit this check; use ${fits.join(' ')}`
			});
		if (c.openOk && c.quantity !== 'resistance')
			ctx.addIssue({
				code: 'custom',
				path: ['openOk'],
				message: 'Only a resistance check can accept an open circuit'
			});
		if (c.quantity === 'visual' && c.bands.length > 0)
			ctx.addIssue({ code: 'custom', path: ['bands'], message: 'A visual check has no limits' });
		if (NEEDS_LIMITS.includes(c.quantity) && c.bands.length === 0)
			ctx.addIssue({
				code: 'custom',
				path: ['bands'],
				message: 'Add a cold spec, a hot spec or another temperature band'
			});
		c.bands.forEach((b, j) => {
			if (NEEDS_LIMITS.includes(c.quantity) && b.min === null && b.max === null)
				ctx.addIssue({
					code: 'custom',
					path: ['bands', j, 'min'],
					message: 'Give a min, a max or both'
				});
			if (NEVER_NEGATIVE.includes(c.quantity))
				for (const k of ['min', 'max'] as const)
					if (b[k] !== null && b[k] < 0)
						ctx.addIssue({
							code: 'custom',
							path: ['bands', j, k],
							message: 'Cannot be below zero'
						});
		});
		for (const [i, j] of overlappingBands(c.bands))
			ctx.addIssue({
				code: 'custom',
				path: ['bands', j, 'fromC'],
				message: `Overlaps the band ${temperatureRangeText(c.bands[i])}`
			});
	});
export type Check = z.output<typeof check>;
export type CheckInput = z.input<typeof check>;

export const sheetSource = z.object({
	document: optionalText(200),
	section: optionalText(60),
	page: optionalText(20)
});

const checks = z
	.array(check)
	.min(1, 'Add at least one check')
	.max(40, 'At most 40 checks')
	.superRefine((list, ctx) => {
		const seen = new Set<string>();
		list.forEach((c, i) => {
			if (seen.has(c.key))
				ctx.addIssue({ code: 'custom', path: [i, 'key'], message: 'Another check uses this short name' });
			seen.add(c.key);
		});
	});

const sheetFields = z.object({ checks, source: sheetSource.nullable().optional() });
export const sheetCreate = sheetFields.extend({ componentId: uuidRef });
export const sheetPatch = sheetFields.partial();
export type SheetInput = z.input<typeof sheetCreate>;

/** Library list query (the table's state in the URL); a missing value takes its default. */
export const LIBRARY_SORT_KEYS = ['partNumber', 'kind', 'updatedAt'] as const;
export const SHEET_FILTERS = ['approved', 'draft', 'none'] as const;
export const libraryQuery = z.object({
	q: searchParam,
	kind: z.enum(COMPONENT_KINDS, oneOf(COMPONENT_KINDS)).optional(),
	sheets: z.enum(SHEET_FILTERS, oneOf(SHEET_FILTERS)).optional(),
	sort: sortParam(LIBRARY_SORT_KEYS, 'partNumber'),
	page: pageParam,
	pageSize: pageSizeParam(20)
});
export type LibraryQuery = z.output<typeof libraryQuery>;

/** A component as the API and the change feed send it. */
export type ComponentRecord = {
	id: string;
	version: number;
	partNumber: string;
	kind: ComponentKind;
	description: string | null;
	fitment: z.output<typeof fitment>[] | null;
	cautions: Caution[] | null;
	positions: z.output<typeof packPosition>[] | null;
	deleted: boolean;
};

/** A spec sheet as the API and the change feed send it (limits in base units). */
export type SheetRecord = {
	id: string;
	version: number;
	componentId: string;
	sheetVersion: number;
	state: 'draft' | 'approved';
	checks: Check[];
	source: z.output<typeof sheetSource> | null;
	approvedBy: string | null;
	approvedAt: string | Date | null;
	deleted: boolean;
};
