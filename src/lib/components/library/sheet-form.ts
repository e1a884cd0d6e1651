/**
 * The sheet editor's state: what the person types (text, so `0,38` and `0.38` both work),
 * turned into the API's input (limits in base units) and checked with the shared zod
 * schema, so the editor shows the same messages, on the same fields, as the server would.
 */
import { parseDecimal } from '$lib/domain/units';
import { COLD_HOT_SPLIT_C, HOT_TOP_C } from '$lib/library/labels';
import { limitFromBase, limitToBase, plainNumber } from '$lib/library/limits';
import {
	sheetCreate,
	UNITS_BY_QUANTITY,
	type Check,
	type CheckCondition,
	type CheckQuantity,
	type SheetInput,
	type SheetRecord
} from '$lib/schemas/component';

export type BandForm = { uid: number; fromC: string; toC: string; min: string; max: string };
export type CheckForm = {
	uid: number;
	key: string;
	/** The key was typed by hand: stop deriving it from the label. */
	keyTouched: boolean;
	label: string;
	quantity: CheckQuantity;
	from: string;
	to: string;
	condition: CheckCondition;
	rangeHint: string;
	unit: string;
	openOk: boolean;
	bands: BandForm[];
	/** A pack's coil the check belongs to; '' for every coil. */
	coil: string;
};
export type SheetForm = { checks: CheckForm[]; document: string; section: string; page: string };

let uid = 0;
const next = () => ++uid;
const num = (n: number | null) => (n === null ? '' : plainNumber(n));

/** The usual cold spec: below 50 °C (common practice). */
export const coldBand = (): BandForm => ({
	uid: next(),
	fromC: '',
	toC: String(COLD_HOT_SPLIT_C),
	min: '',
	max: ''
});
/** The usual hot spec: 50 to 100 °C (common practice). */
export const hotBand = (): BandForm => ({
	uid: next(),
	fromC: String(COLD_HOT_SPLIT_C),
	toC: String(HOT_TOP_C),
	min: '',
	max: ''
});
export const otherBand = (): BandForm => ({ uid: next(), fromC: '', toC: '', min: '', max: '' });

/** A new resistance check with an empty cold and hot spec. */
export function newCheck(): CheckForm {
	return {
		uid: next(),
		key: '',
		keyTouched: false,
		label: '',
		quantity: 'resistance',
		from: '',
		to: '',
		condition: 'key_off',
		rangeHint: '',
		unit: UNITS_BY_QUANTITY.resistance[0],
		openOk: false,
		bands: [coldBand(), hotBand()],
		coil: ''
	};
}

/** A key from a label: `Primary winding (A)` → `primary_winding_a`. */
export function keyFromLabel(label: string): string {
	return label
		.toLowerCase()
		.normalize('NFKD')
		.replace(/[^a-z0-9]+/g, '_')
		.replace(/^_+|_+$/g, '')
		.slice(0, 40);
}

function checkForm(c: Check): CheckForm {
	return {
		uid: next(),
		key: c.key,
		keyTouched: true,
		label: c.label,
		quantity: c.quantity,
		from: c.from ?? '',
		to: c.to ?? '',
		condition: c.condition,
		rangeHint: c.rangeHint ?? '',
		unit: c.unit ?? '',
		openOk: c.openOk,
		coil: c.coil ?? '',
		bands: c.bands.map((b) => ({
			uid: next(),
			fromC: num(b.fromC),
			toC: num(b.toC),
			min: b.min === null ? '' : plainNumber(limitFromBase(b.min, c.unit)),
			max: b.max === null ? '' : plainNumber(limitFromBase(b.max, c.unit))
		}))
	};
}

/** The form for a stored sheet (or a new one with one empty check). */
export function formFromSheet(sheet?: Pick<SheetRecord, 'checks' | 'source'> | null): SheetForm {
	return {
		checks: sheet?.checks.length ? sheet.checks.map(checkForm) : [newCheck()],
		document: sheet?.source?.document ?? '',
		section: sheet?.source?.section ?? '',
		page: sheet?.source?.page ?? ''
	};
}

/** The API input for the form, and the fields whose number could not be read. */
export function inputFromForm(form: SheetForm, componentId: string) {
	const errors: Record<string, string> = {};
	const decimal = (text: string, path: string) => {
		if (text.trim() === '') return null;
		const n = parseDecimal(text);
		if (n === null) errors[path] = 'Not a number (use 0.38 or 0,38)';
		return n;
	};
	const input: SheetInput = {
		componentId,
		source: { document: form.document, section: form.section, page: form.page },
		checks: form.checks.map((c, i) => ({
			key: c.key,
			label: c.label,
			quantity: c.quantity,
			from: c.from,
			to: c.to,
			condition: c.condition,
			rangeHint: c.rangeHint,
			unit: c.quantity === 'visual' ? null : c.unit,
			openOk: c.quantity === 'resistance' && c.openOk,
			coil: c.coil,
			bands:
				c.quantity === 'visual'
					? []
					: c.bands.map((b, j) => {
							const p = `checks.${i}.bands.${j}`;
							const min = decimal(b.min, `${p}.min`);
							const max = decimal(b.max, `${p}.max`);
							return {
								fromC: decimal(b.fromC, `${p}.fromC`),
								toC: decimal(b.toC, `${p}.toC`),
								min: min === null ? null : limitToBase(min, c.unit),
								max: max === null ? null : limitToBase(max, c.unit)
							};
						})
		}))
	};
	return { input, errors };
}

/** Every problem of the form by field path (`checks.1.bands.0.max` …), first message each. */
export function validateForm(form: SheetForm, componentId: string): Record<string, string> {
	const { input, errors } = inputFromForm(form, componentId);
	const r = sheetCreate.safeParse(input);
	if (!r.success)
		for (const issue of r.error.issues) {
			const path = issue.path.join('.') || '_';
			errors[path] ??= issue.message;
		}
	return errors;
}
