/**
 * Clashing edits in the product's words (DESIGN §7): the name of each record's fields, how
 * a stored value reads, and how a value typed by the lead becomes the field's value. Pure:
 * the inbox page and its tests share it.
 */
import { STATUS_LABELS, type JobStatus } from '../schemas/job';
import { KIND_LABELS } from '../library/labels';
import type { ComponentKind } from '../schemas/component';

/**
 * How a field's value reads and whether the lead may type one: `text` and `number` take a
 * typed value, `choice` fields offer their values, the rest are settled by picking a side.
 */
export type FieldKind =
	| 'text'
	| 'number'
	| 'status'
	| 'testState'
	| 'yesNo'
	| 'person'
	| 'customer'
	| 'vehicle'
	| 'codes'
	| 'kind'
	| 'deleted'
	| 'other';
type FieldWord = { label: string; kind: FieldKind };

const DELETED: FieldWord = { label: 'Delete or keep the record', kind: 'deleted' };

export const FIELD_WORDS: Record<string, Record<string, FieldWord>> = {
	job: {
		complaint: { label: 'Complaint', kind: 'text' },
		location: { label: 'Location', kind: 'text' },
		notes: { label: 'Notes', kind: 'text' },
		status: { label: 'Status', kind: 'status' },
		assigneeId: { label: 'Assigned to', kind: 'person' },
		customerId: { label: 'Customer', kind: 'customer' },
		vehicleId: { label: 'Vehicle', kind: 'vehicle' },
		codesBefore: { label: 'Codes read before the work', kind: 'codes' },
		codesAfter: { label: 'Codes read after the work', kind: 'codes' }
	},
	customer: {
		name: { label: 'Name', kind: 'text' },
		phone: { label: 'Phone', kind: 'text' },
		email: { label: 'E-mail', kind: 'text' },
		reportConsent: { label: 'Report by e-mail', kind: 'yesNo' }
	},
	vehicle: {
		vin: { label: 'VIN', kind: 'text' },
		chassisNo: { label: 'Chassis number', kind: 'text' },
		chassisReason: { label: 'Why no VIN', kind: 'text' },
		plate: { label: 'Plate', kind: 'text' },
		make: { label: 'Make', kind: 'text' },
		model: { label: 'Model', kind: 'text' },
		year: { label: 'Year', kind: 'number' },
		engineCode: { label: 'Engine code', kind: 'text' },
		odometer: { label: 'Odometer', kind: 'number' },
		hybrid: { label: 'Hybrid or electric', kind: 'yesNo' },
		customerId: { label: 'Owner', kind: 'customer' }
	},
	test: {
		partNumber: { label: 'Part number', kind: 'text' },
		position: { label: 'Cylinders', kind: 'text' },
		notes: { label: 'Notes', kind: 'text' },
		state: { label: 'Test', kind: 'testState' },
		meter: { label: 'Meter set-up', kind: 'other' },
		temperature: { label: 'Temperature', kind: 'other' }
	},
	component: {
		partNumber: { label: 'Part number', kind: 'text' },
		description: { label: 'Description', kind: 'text' },
		kind: { label: 'Kind of part', kind: 'kind' }
	},
	sheet: {
		checks: { label: 'Checks', kind: 'other' },
		source: { label: 'Where the figures come from', kind: 'other' }
	}
};

export const ENTITY_WORDS: Record<string, string> = {
	job: 'Job',
	customer: 'Customer',
	vehicle: 'Vehicle',
	test: 'Test',
	component: 'Part',
	sheet: 'Spec sheet'
};

/** The name and kind of a record's field ("Status", a choice); unknown fields read as "Details". */
export function fieldWord(entity: string, field: string): FieldWord {
	if (field === '_deleted') return DELETED;
	return FIELD_WORDS[entity]?.[field] ?? { label: 'Details', kind: 'other' };
}

export const TEST_STATES = {
	in_progress: 'In progress',
	done: 'Finished',
	abandoned: 'Abandoned'
} as const;

/** The values a choice field offers, for "another value". */
export function choicesOf(kind: FieldKind): { value: string; label: string }[] | null {
	if (kind === 'status')
		return Object.entries(STATUS_LABELS).map(([value, label]) => ({ value, label }));
	if (kind === 'testState')
		return Object.entries(TEST_STATES).map(([value, label]) => ({ value, label }));
	if (kind === 'yesNo')
		return [
			{ value: 'yes', label: 'Yes' },
			{ value: 'no', label: 'No' }
		];
	return null;
}

/** Whether the lead can give a value of their own (typed, or chosen from a list). */
export const takesOwnValue = (kind: FieldKind) =>
	kind === 'text' || kind === 'number' || choicesOf(kind) !== null;

/** Names the inbox looks values up in: people, customers and vehicles by id. */
export type Names = {
	people: Map<string, string>;
	customers: Map<string, string>;
	vehicles: Map<string, string>;
};

/** A stored value as a person reads it. */
export function valueText(kind: FieldKind, value: unknown, names: Names): string {
	if (value === null || value === undefined || value === '') return '(empty)';
	switch (kind) {
		case 'status':
			return STATUS_LABELS[value as JobStatus] ?? String(value);
		case 'testState':
			return TEST_STATES[value as keyof typeof TEST_STATES] ?? String(value);
		case 'yesNo':
			return value ? 'Yes' : 'No';
		case 'deleted':
			return value ? 'Delete it' : 'Keep it, with the later changes';
		case 'person':
			return names.people.get(String(value)) ?? 'Someone no longer in the workshop';
		case 'customer':
			return names.customers.get(String(value)) ?? 'A customer no longer on file';
		case 'vehicle':
			return names.vehicles.get(String(value)) ?? 'A vehicle no longer on file';
		case 'kind':
			return KIND_LABELS[value as ComponentKind] ?? String(value);
		case 'codes': {
			const list = value as { code: string; text?: string }[];
			return list.length
				? list.map((c) => (c.text ? `${c.code} (${c.text})` : c.code)).join(', ')
				: '(none)';
		}
		case 'text':
		case 'number':
			return String(value);
		default:
			return describeOther(value);
	}
}

function describeOther(value: unknown): string {
	if (typeof value !== 'object') return String(value);
	const v = value as Record<string, unknown>;
	if (typeof v.mode === 'string') {
		const modes: Record<string, string> = {
			overnight: 'Stood overnight',
			warm: 'Warm',
			just_run: 'Just run',
			unknown: 'Not known'
		};
		return v.mode === 'measured' ? `Measured ${v.tempC} °C` : (modes[v.mode] ?? v.mode);
	}
	if (Array.isArray(v.ranges))
		return `${v.name ?? 'Meter'}, ${v.relativeMode ? 'relative mode' : `leads ${v.leadResistance ?? 0} Ω taken off`}`;
	if (Array.isArray(value)) return `${value.length} item${value.length === 1 ? '' : 's'}`;
	return 'Changed details';
}

/**
 * The value the lead gave, as the field stores it: text trimmed ('' is empty), a number
 * parsed (text that is not one is passed on for the record's rules to refuse with their
 * message), a choice's code, yes/no as true/false.
 */
export function typedValue(kind: FieldKind, text: string): unknown {
	const t = text.trim();
	if (kind === 'number') {
		if (t === '') return null;
		const n = Number(t.replace(/\s/g, '').replace(',', '.'));
		return Number.isFinite(n) ? n : t;
	}
	if (kind === 'yesNo') return t === 'yes' ? true : t === 'no' ? false : t;
	if (kind === 'text') return t === '' ? null : t;
	return t;
}
