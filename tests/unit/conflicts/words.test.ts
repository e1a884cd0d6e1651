import { describe, expect, it } from 'vitest';
import { settleForm, settleInputOf } from '../../../src/lib/conflicts/form';
import {
	choicesOf,
	fieldWord,
	takesOwnValue,
	typedValue,
	valueText,
	type Names
} from '../../../src/lib/conflicts/words';

// Invented people, customers and vehicles.
const NAMES: Names = {
	people: new Map([['u1', 'Sanna Velloway']]),
	customers: new Map([['c1', 'Ilse Marrow']]),
	vehicles: new Map([['v1', 'Corvane Brisel TB24 KQL']])
};

describe('a clashing field in the product’s words', () => {
	it('names fields as people know them, never by their code', () => {
		expect(fieldWord('job', 'status').label).toBe('Status');
		expect(fieldWord('job', 'assigneeId').label).toBe('Assigned to');
		expect(fieldWord('vehicle', 'odometer')).toEqual({ label: 'Odometer', kind: 'number' });
		expect(fieldWord('job', '_deleted').label).toBe('Delete or keep the record');
		expect(fieldWord('job', 'somethingNew').label).toBe('Details');
	});

	it('reads values as words: statuses, people, customers, yes/no, fault codes, empties', () => {
		expect(valueText('status', 'awaiting_parts', NAMES)).toBe('Awaiting parts');
		expect(valueText('status', 'retested_ok', NAMES)).toBe('Re-tested OK');
		expect(valueText('person', 'u1', NAMES)).toBe('Sanna Velloway');
		expect(valueText('person', 'u9', NAMES)).toBe('Someone no longer in the workshop');
		expect(valueText('customer', 'c1', NAMES)).toBe('Ilse Marrow');
		expect(valueText('vehicle', 'v1', NAMES)).toBe('Corvane Brisel TB24 KQL');
		expect(valueText('yesNo', true, NAMES)).toBe('Yes');
		expect(
			valueText('codes', [{ code: 'P0301', text: 'Cylinder 1 misfire' }, { code: 'P0302' }], NAMES)
		).toBe('P0301 (Cylinder 1 misfire), P0302');
		expect(valueText('text', null, NAMES)).toBe('(empty)');
		expect(valueText('deleted', true, NAMES)).toBe('Delete it');
		expect(valueText('other', { mode: 'measured', tempC: 21 }, NAMES)).toBe('Measured 21 °C');
	});

	it('lets the lead type text and numbers and choose statuses, but only pick people and codes', () => {
		expect(takesOwnValue('text')).toBe(true);
		expect(takesOwnValue('number')).toBe(true);
		expect(takesOwnValue('status')).toBe(true);
		expect(choicesOf('status')?.map((c) => c.value)).toContain('awaiting_parts');
		expect(takesOwnValue('person')).toBe(false);
		expect(takesOwnValue('codes')).toBe(false);
	});

	it('turns a typed value into the field’s value: trimmed text, numbers with a decimal comma, yes/no', () => {
		expect(typedValue('text', '  Rear bay 2 ')).toBe('Rear bay 2');
		expect(typedValue('text', '   ')).toBeNull();
		expect(typedValue('number', '84 210')).toBe(84210);
		expect(typedValue('number', '12,5')).toBe(12.5);
		expect(typedValue('number', 'lots')).toBe('lots'); // passed on for the record's rules to refuse
		expect(typedValue('yesNo', 'yes')).toBe(true);
		expect(typedValue('status', 'repaired')).toBe('repaired');
	});
});

describe('the settle form', () => {
	const id = '019a0000-0000-7000-8000-00000000c001';

	it('turns each choice into the service’s input, with the note', () => {
		const f = (v: Record<string, string>) => settleForm.parse({ conflictId: id, ...v });
		expect(settleInputOf(f({ choice: 'stored', note: ' checked the car ' }), 'status')).toEqual({
			pick: 'server',
			note: 'checked the car'
		});
		expect(settleInputOf(f({ choice: 'phone:dev-2' }), 'status')).toEqual({
			pick: 'candidate',
			deviceId: 'dev-2',
			note: undefined
		});
		expect(settleInputOf(f({ choice: 'own', value: '91500' }), 'number')).toEqual({
			pick: 'value',
			value: 91500,
			note: undefined
		});
	});

	it('asks for a choice when none was picked', () => {
		const r = settleForm.safeParse({ conflictId: id });
		expect(r.success).toBe(false);
		expect(r.error?.issues[0].path).toEqual(['choice']);
		expect(r.error?.issues[0].message).toBe('Pick the value to keep');
	});
});
