import { describe, expect, it } from 'vitest';
import {
	formFromSheet,
	inputFromForm,
	keyFromLabel,
	newCheck,
	validateForm
} from '../../../src/lib/components/library/sheet-form';

const ID = '019a0000-0000-7000-8000-000000000401';

describe('the sheet editor’s form', () => {
	it('starts a new check with an empty cold spec (below 50 °C) and hot spec (50 to 100 °C), common practice', () => {
		const c = newCheck();
		expect(c.bands.map((b) => [b.fromC, b.toC])).toEqual([
			['', '50'],
			['50', '100']
		]);
	});

	it('reads a decimal comma or point and stores the figure in base units (8,8 kΩ → 8800 Ω)', () => {
		const form = formFromSheet(null);
		Object.assign(form.checks[0], { key: 's', label: 'Secondary', unit: 'kΩ' });
		Object.assign(form.checks[0].bands[0], { min: '8,8', max: '14.6' });
		form.checks[0].bands.pop();
		const { input, errors } = inputFromForm(form, ID);
		expect(errors).toEqual({});
		expect(input.checks[0].bands).toEqual([{ fromC: null, toC: 50, min: 8800, max: 14600 }]);
		expect(validateForm(form, ID)).toEqual({});
	});

	it('shows a stored sheet in the check’s unit and gives back the same figures', () => {
		const sheet = {
			source: null,
			checks: [
				{
					key: 's',
					label: 'Secondary',
					quantity: 'resistance' as const,
					from: null,
					to: null,
					condition: 'key_off' as const,
					rangeHint: null,
					unit: 'kΩ',
					openOk: false,
					bands: [{ fromC: null, toC: 50, min: 8800, max: 14600 }]
				}
			]
		};
		const form = formFromSheet(sheet);
		expect(form.checks[0].bands[0]).toMatchObject({
			min: '8.8',
			max: '14.6',
			toC: '50',
			fromC: ''
		});
		expect(inputFromForm(form, ID).input.checks[0].bands).toEqual(sheet.checks[0].bands);
	});

	it('names the field of a number it cannot read and of a rule the schema refuses', () => {
		const form = formFromSheet(null);
		Object.assign(form.checks[0], { key: 'p', label: 'Primary' });
		Object.assign(form.checks[0].bands[0], { min: 'abc', max: '0.5' });
		Object.assign(form.checks[0].bands[1], { min: '0.9', max: '0.6' });
		const errors = validateForm(form, ID);
		expect(errors['checks.0.bands.0.min']).toBe('Not a number (use 0.38 or 0,38)');
		expect(errors['checks.0.bands.1.max']).toBe('Max is below min');
	});

	it('makes a key from a label', () => {
		expect(keyFromLabel('Primary winding (coil A)')).toBe('primary_winding_coil_a');
	});
});
