import { describe, expect, it } from 'vitest';
import {
	componentCreate,
	componentPatch,
	overlappingBands,
	sheetCreate,
	sheetPatch,
	type CheckInput
} from '../../../src/lib/schemas/component';

const COMPONENT_ID = '019a0000-0000-7000-8000-000000000401';
// Invented figures; limits in base units (ohms).
const primary = (over: Partial<CheckInput> = {}): CheckInput => ({
	key: 'primary',
	label: 'Primary winding',
	quantity: 'resistance',
	from: '1',
	to: '2',
	condition: 'key_off',
	unit: 'Ω',
	bands: [
		{ fromC: null, toC: 50, min: 0.4, max: 0.6 },
		{ fromC: 50, toC: 100, min: 0.5, max: 0.7 }
	],
	...over
});
const sheet = (...checks: CheckInput[]) => ({ componentId: COMPONENT_ID, checks });

/** The field paths a sheet is refused on (`checks.1.bands.0.max` …). */
function refusedPaths(input: unknown): string[] {
	const r = sheetCreate.safeParse(input);
	return r.success ? [] : r.error.issues.map((i) => i.path.join('.'));
}

describe('a spec sheet', () => {
	it('accepts a cold spec [−∞, 50) next to a hot spec [50, 100): half-open bands touch, they do not overlap (DESIGN §4)', () => {
		expect(refusedPaths(sheet(primary()))).toEqual([]);
	});

	it('refuses overlapping bands on the later band’s “from”, naming the band it overlaps', () => {
		const r = sheetCreate.safeParse(
			sheet(
				primary(),
				primary({
					key: 'secondary',
					bands: [
						{ fromC: null, toC: 50, min: 8000, max: 12000 },
						{ fromC: 40, toC: 100, min: 9000, max: 14000 }
					]
				})
			)
		);
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path.join('.')).toBe('checks.1.bands.1.fromC');
		expect(r.error!.issues[0].message).toBe('Overlaps the band below 50 °C');
	});

	it.each([
		[
			'two unbounded bands',
			[
				{ fromC: null, toC: null, min: 1 },
				{ fromC: 20, toC: 30, min: 1 }
			],
			'checks.0.bands.1.fromC'
		],
		[
			'a band inside another',
			[
				{ fromC: 0, toC: 100, min: 1 },
				{ fromC: 20, toC: 30, min: 1 }
			],
			'checks.0.bands.1.fromC'
		],
		[
			'bands listed hot first',
			[
				{ fromC: 50, toC: 100, min: 1 },
				{ fromC: 20, toC: 60, min: 1 }
			],
			'checks.0.bands.0.fromC'
		]
	])('refuses %s', (_, bands, path) => {
		expect(refusedPaths(sheet(primary({ bands })))).toEqual([path]);
	});

	it('refuses a min above the max on that band’s max', () => {
		const bands = [{ fromC: null, toC: 50, min: 0.6, max: 0.4 }];
		expect(refusedPaths(sheet(primary(), primary({ key: 'b', bands })))).toEqual([
			'checks.1.bands.0.max'
		]);
	});

	it('accepts a min equal to the max (limits are inclusive)', () => {
		expect(
			refusedPaths(sheet(primary({ bands: [{ fromC: null, toC: null, min: 1, max: 1 }] })))
		).toEqual([]);
	});

	it('refuses a “to” temperature at or below the “from” temperature', () => {
		expect(refusedPaths(sheet(primary({ bands: [{ fromC: 50, toC: 50, min: 1 }] })))).toEqual([
			'checks.0.bands.0.toC'
		]);
	});

	it.each([
		['resistance', 'V'],
		['resistance', 'mV'],
		['voltage', 'Ω'],
		['voltage_drop', 'A'],
		['current', 'kV'],
		['spark', 'Ω'],
		['visual', 'V'],
		['resistance', 'furlong']
	] as const)('refuses a %s check in %s on its unit', (quantity, unit) => {
		const bands = quantity === 'visual' ? [] : [{ fromC: null, toC: null, min: 1, max: 2 }];
		expect(refusedPaths(sheet(primary({ quantity, unit, bands, openOk: false })))).toEqual([
			'checks.0.unit'
		]);
	});

	it.each([
		['resistance', ['mΩ', 'Ω', 'kΩ', 'MΩ']],
		['voltage', ['mV', 'V', 'kV']],
		['voltage_drop', ['mV', 'V']],
		['current', ['mA', 'A']],
		['spark', ['mm', 'kV']]
	] as const)('accepts a %s check in each of %j', (quantity, units) => {
		for (const unit of units)
			expect(
				refusedPaths(
					sheet(primary({ quantity, unit, bands: [{ fromC: null, toC: null, min: 1, max: 2 }] }))
				)
			).toEqual([]);
	});

	it('takes “kohm” and the ohm sign U+2126 as the library’s Ω symbol (U+03A9)', () => {
		const r = sheetCreate.parse(
			sheet(primary({ unit: 'kohm' }), primary({ key: 'b', unit: '\u2126' }))
		);
		expect(r.checks.map((c) => c.unit)).toEqual(['kΩ', 'Ω']);
	});

	it('refuses a visual check with limits, and a resistance check without any band', () => {
		const visual = {
			key: 'look',
			label: 'Cracks or tracking',
			quantity: 'visual',
			condition: 'key_off'
		} as const;
		expect(refusedPaths(sheet(visual))).toEqual([]);
		expect(refusedPaths(sheet({ ...visual, bands: [{ fromC: null, toC: null, min: 1 }] }))).toEqual(
			['checks.0.bands']
		);
		expect(refusedPaths(sheet(primary({ bands: [] })))).toEqual(['checks.0.bands']);
	});

	it('lets either limit be absent but not both', () => {
		expect(
			refusedPaths(sheet(primary({ bands: [{ fromC: null, toC: null, min: 0.4, max: null }] })))
		).toEqual([]);
		expect(
			refusedPaths(sheet(primary({ bands: [{ fromC: null, toC: null, min: null, max: 0.6 }] })))
		).toEqual([]);
		expect(
			refusedPaths(sheet(primary({ bands: [{ fromC: null, toC: null, min: null, max: null }] })))
		).toEqual(['checks.0.bands.0.min']);
	});

	it('refuses a negative resistance', () => {
		expect(
			refusedPaths(sheet(primary({ bands: [{ fromC: null, toC: null, min: -1, max: 1 }] })))
		).toEqual(['checks.0.bands.0.min']);
	});

	it('accepts an open circuit only on a resistance check', () => {
		expect(refusedPaths(sheet(primary({ openOk: true })))).toEqual([]);
		const volts = primary({ quantity: 'voltage', unit: 'V', openOk: true });
		expect(refusedPaths(sheet(volts))).toEqual(['checks.0.openOk']);
	});

	it('refuses two checks with the same key, on the second', () => {
		expect(refusedPaths(sheet(primary(), primary()))).toEqual(['checks.1.key']);
	});

	it('refuses a sheet without checks, and a key with capitals', () => {
		expect(refusedPaths(sheet())).toEqual(['checks']);
		expect(refusedPaths(sheet(primary({ key: 'Primary' })))).toEqual(['checks.0.key']);
	});

	it('lets a patch send the source alone', () => {
		expect(sheetPatch.parse({ source: { document: 'Data sheet', page: '4' } })).toEqual({
			source: { document: 'Data sheet', page: '4' }
		});
	});
});

describe('overlappingBands', () => {
	it('finds every overlapping pair, earlier band first', () => {
		const b = (fromC: number | null, toC: number | null) => ({ fromC, toC, min: 1, max: 2 });
		expect(overlappingBands([b(null, 50), b(50, 100), b(100, null)])).toEqual([]);
		expect(overlappingBands([b(60, 90), b(null, 70), b(80, null)])).toEqual([
			[1, 0],
			[0, 2]
		]);
	});
});

describe('a component', () => {
	const coilPack = {
		partNumber: 'TB-CP-0001',
		kind: 'coil_pack',
		positions: [
			{ position: 'A', cylinders: [1, 4] },
			{ position: 'B', cylinders: [2, 3] }
		]
	};

	it('keeps which cylinders each coil of a pack serves, as entered', () => {
		expect(componentCreate.parse(coilPack).positions).toEqual(coilPack.positions);
	});

	it.each([
		[{ positions: [{ position: 'A', cylinders: [1, 1] }] }, 'positions.0.cylinders'],
		[{ positions: [{ position: 'A', cylinders: [] }] }, 'positions.0.cylinders'],
		[
			{
				positions: [
					{ position: 'A', cylinders: [1] },
					{ position: 'a', cylinders: [2] }
				]
			},
			'positions.1.position'
		],
		[
			{ fitment: [{ make: 'Corvane', model: 'Brisel', yearFrom: 2020, yearTo: 2017 }] },
			'fitment.0.yearTo'
		],
		[{ fitment: [{ make: '', model: 'Brisel' }] }, 'fitment.0.make'],
		[{ cautions: ['lasers'] }, 'cautions.0'],
		[{ kind: 'widget' }, 'kind'],
		[{ partNumber: ' ' }, 'partNumber']
	])('refuses %j on %s', (over, path) => {
		const r = componentCreate.safeParse({ ...coilPack, ...over });
		expect(r.success).toBe(false);
		expect(r.error!.issues.map((i) => i.path.join('.'))).toEqual([path]);
	});

	it('patches only the fields sent (no defaults fill in the others)', () => {
		expect(componentPatch.parse({ description: 'Pencil coil' })).toEqual({
			description: 'Pencil coil'
		});
	});
});
