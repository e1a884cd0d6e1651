/**
 * The meters form: each range as its accuracy table states it — what it measures, its
 * resolution, ±(% of reading + counts) and its largest reading, in a unit of its quantity —
 * and back to the saved meters (base units), with every problem said in plain words beside
 * the field it belongs to.
 */
import { parseDecimal, toBase } from '$lib/domain/units';
import type { SavedMeter } from '$lib/local/library';
import { meterRange, RANGE_QUANTITIES } from '$lib/schemas/test';

export type RangeQuantity = (typeof RANGE_QUANTITIES)[number];
export type RangeRow = { label: string; quantity: RangeQuantity; resolution: string; unit: string; pct: string; counts: string; max: string };
export type MeterRows = { name: string; rows: RangeRow[] };

/** The units a range's figures may be entered in, smallest first. */
export const FORM_UNITS: Record<RangeQuantity, [small: string, large: string]> = {
	resistance: ['Ω', 'kΩ'],
	voltage: ['mV', 'V'],
	current: ['mA', 'A']
};
export const QUANTITY_WORDS: Record<RangeQuantity, string> = { resistance: 'Ohms (Ω)', voltage: 'Volts (V)', current: 'Amps (A)' };

/** Saved meters as form rows; figures in the unit that keeps them readable. */
export function toRows(m: SavedMeter): MeterRows {
	return {
		name: m.name,
		rows: m.ranges.map((r) => {
			const quantity = r.quantity ?? 'resistance';
			const [small, large] = FORM_UNITS[quantity];
			const useLarge = quantity === 'resistance' ? r.resolution >= 1 : r.resolution >= 0.001;
			const unit = useLarge ? large : small;
			const factor = toBase(1, unit);
			const show = (v: number | null | undefined) => (v == null ? '' : String(Number((v / factor).toPrecision(12))));
			return { label: r.label, quantity, resolution: show(r.resolution), unit, pct: String(r.pctOfReading), counts: String(r.counts), max: show(r.maxReading) };
		})
	};
}

/** The form's field for each schema field, so a message lands beside the right input. */
const FIELD_OF: Record<string, keyof RangeRow> = {
	label: 'label',
	quantity: 'quantity',
	resolution: 'resolution',
	pctOfReading: 'pct',
	counts: 'counts',
	maxReading: 'max'
};

/**
 * The form's rows as saved meters, or the problems: `errors['i.j.field']` is the message for
 * range j of meter i (field as in {@link RangeRow}).
 */
export function parseRows(meters: MeterRows[]): { meters: SavedMeter[] | null; errors: Record<string, string> } {
	const errors: Record<string, string> = {};
	const out = meters.map((m, i) => ({
		name: m.name.trim() || `Meter ${i + 1}`,
		ranges: m.rows.map((r, j) => {
			const num = (t: string) => (t.trim() === '' ? undefined : (parseDecimal(t) ?? NaN));
			const inUnit = (t: string) => {
				const v = num(t);
				return v === undefined || Number.isNaN(v) ? v : toBase(v, r.unit);
			};
			const range = {
				label: r.label,
				quantity: r.quantity,
				resolution: inUnit(r.resolution),
				pctOfReading: num(r.pct),
				counts: num(r.counts),
				maxReading: r.max.trim() ? inUnit(r.max) : null
			};
			const ok = meterRange.safeParse(range);
			if (!ok.success) {
				for (const issue of ok.error.issues) {
					const field = FIELD_OF[String(issue.path[0])] ?? 'label';
					errors[`${i}.${j}.${field}`] ??= issue.message;
				}
				return range as never;
			}
			return ok.data;
		})
	}));
	return { meters: Object.keys(errors).length ? null : out, errors };
}

export const blankRow = (quantity: RangeQuantity = 'resistance'): RangeRow => ({
	label: '',
	quantity,
	resolution: '',
	unit: FORM_UNITS[quantity][0],
	pct: '',
	counts: '',
	max: ''
});
