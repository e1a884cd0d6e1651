/**
 * The capture screen's decisions, pure, so that they are tested without a browser: which
 * checks are asked at which position, which unit and range a check is read in, what a typed
 * reading means (result, words, whether it may be saved, what to do next), how old the lead
 * reading is, and the side-by-side comparison of the positions. Values in base units.
 */
import { formatQuantity, parseDecimal, toBase, type Quantity } from '../domain/units';
import type { SpecBand } from '../domain/spec';
import { bandShortName } from '../library/labels';
import {
	comparePositions,
	noFigureText,
	positionLabel,
	rangeWarning,
	unitWarning,
	type CoilPosition
} from './decisions';
import {
	bandsFor,
	evaluateReading,
	meterFor,
	quantityOfRange,
	rangeQuantityOf,
	type CheckSpec,
	type MeterSnapshot,
	type RangeQuantity,
	type ReadingResult,
	type Sample,
	type TemperatureSnapshot,
	type VisualFinding
} from './reading';
import { maySave, resultKey, resultText, type ResultKey } from './results';

/** A check as the sheet gives it, with what the screen shows. */
export type FlowCheck = CheckSpec & {
	label: string;
	from?: string | null;
	to?: string | null;
	condition: string;
	rangeHint?: string | null;
};
/** One thing to capture: a check at a position. */
export type Cell = { key: string; position: string; label: string; check: FlowCheck };
export type MeterRangeSetup = {
	label: string;
	resolution: number;
	pctOfReading: number;
	counts: number;
	maxReading?: number | null;
	quantity?: RangeQuantity | null;
};
export type TestMeter = {
	name: string;
	ranges: MeterRangeSetup[];
	leadResistance: number;
	relativeMode: boolean;
	zeroReading?: number | null;
	leadReadAt?: string | null;
};

/**
 * The cells of a test: every check at every position, except that a check tied to one coil
 * of a pack is asked only at that coil. Spark checks belong to the spark test. Each cell is
 * labelled with its position ("Coil A (cyl 1 & 4) · Primary winding"); a single position
 * needs no label.
 */
export function cellsFor(positions: readonly string[], checks: readonly FlowCheck[], coils: readonly CoilPosition[] = []): Cell[] {
	const asked = checks.filter((c) => c.quantity !== 'spark');
	return positions.flatMap((p) =>
		asked
			.filter((c) => !c.coil || c.coil.toUpperCase() === p.toUpperCase())
			.map((check) => {
				const where = positions.length > 1 || coils.length ? `${positionLabel(p, coils)} · ` : '';
				return { key: `${p}|${check.key}`, position: p, label: `${where}${check.label}`, check };
			})
	);
}

/** The units a check's reading may be typed in (a toggle beside the entry). */
export function unitsFor(check: Pick<CheckSpec, 'quantity' | 'unit'>): string[] {
	const q = rangeQuantityOf(check.quantity);
	if (check.quantity === 'visual') return [];
	return q === 'voltage' ? ['mV', 'V'] : q === 'current' ? ['mA', 'A'] : ['Ω', 'kΩ'];
}

/** The unit an entry starts in: the check's own when it is offered, else the first offered. */
export function startUnit(check: Pick<CheckSpec, 'quantity' | 'unit'>): string {
	const units = unitsFor(check);
	return check.unit && units.includes(check.unit) ? check.unit : (units[0] ?? '');
}

/** The quantity `formatQuantity` shows a check's values in. */
export const displayQuantity = (check: Pick<CheckSpec, 'quantity'>): Quantity => rangeQuantityOf(check.quantity);

/** The ranges of the meter a check is read on (its quantity's). */
export const rangesFor = (meter: TestMeter, check: Pick<CheckSpec, 'quantity'>) =>
	meter.ranges.filter((r) => quantityOfRange(r) === rangeQuantityOf(check.quantity));

/**
 * The range to start a check on: the finest of the check's quantity that holds the limits
 * and can resolve them; else the finest that holds them; else the first of its quantity.
 */
export function pickRange(meter: TestMeter, check: Pick<CheckSpec, 'quantity' | 'bands'>): string {
	const own = rangesFor(meter, check);
	const top = Math.max(0, ...check.bands.map((b) => b.max ?? b.min ?? 0));
	const fits = own.filter((r) => (r.maxReading ?? Infinity) >= top);
	const good = fits.filter((r) => !rangeWarning({ ...r, maxReading: r.maxReading ?? undefined }, check.bands));
	const pick = [...(good.length ? good : fits)].sort((a, b) => a.resolution - b.resolution)[0] ?? own[0] ?? meter.ranges[0];
	return pick?.label ?? '';
}

/** Whether the meter has a finer range of the same quantity than `label` (for the borderline words). */
export function hasFinerRange(meter: TestMeter, check: Pick<CheckSpec, 'quantity'>, label: string): boolean {
	const own = rangesFor(meter, check);
	const current = own.find((r) => r.label === label);
	return !!current && own.some((r) => r.resolution < current.resolution);
}

/** What is typed: the entry and the samples kept so far, in the unit chosen. */
export type CellDraft = { entry: string; unit: string; samples: Sample[]; rangeLabel: string; visual?: VisualFinding | null };

/** The entry as a sample, or null when nothing (or nothing valid) is typed. */
export function entrySample(d: Pick<CellDraft, 'entry' | 'unit'>): Sample | null {
	if (d.entry === 'OL') return { value: 'OL', unit: d.unit };
	const v = parseDecimal(d.entry);
	return v === null ? null : { value: v, unit: d.unit };
}

/** Everything the screen says about a cell's reading as typed. */
export type ReadingView = {
	result: ReadingResult | null;
	key: ResultKey | null;
	/** The result in words, "Can’t tell — re-zero the leads". */
	text: string | null;
	/** The bands that apply at the test's temperature (shown before any reading). */
	bands: SpecBand[];
	/** A warning before any reading: the range cannot resolve the spec. */
	rangeWarning: string | null;
	/** What to do now, in a sentence, when the result needs it. */
	advice: string | null;
	unitWarning: string | null;
	canSave: boolean;
	meter: MeterSnapshot;
};

/** Judge a cell's samples (kept and typed) as the screen shows them. */
export function viewReading(cell: Cell, draft: CellDraft, meter: TestMeter, temperature: TemperatureSnapshot, locale = 'en'): ReadingView {
	const check = cell.check;
	const snapshot = meterFor(meter, draft.rangeLabel, rangeQuantityOf(check.quantity));
	const bands = bandsFor(check.bands, temperature);
	const warnRange = check.quantity === 'visual' ? null : rangeWarning({ ...snapshot, label: draft.rangeLabel }, bands);
	const typed = entrySample(draft);
	const samples = typed ? [...draft.samples, typed] : draft.samples;
	const visual = check.quantity === 'visual' ? (draft.visual ?? null) : null;
	const none = { result: null, key: null, text: null, bands, rangeWarning: warnRange, unitWarning: null, canSave: false, meter: snapshot };
	if (check.quantity === 'visual' ? !visual : samples.length === 0) {
		return { ...none, advice: bands.length || check.quantity === 'visual' ? null : noFigureText(check.bands, temperature) };
	}
	const result = evaluateReading(check, samples, snapshot, temperature, visual);
	const key = resultKey(result.verdict, result.value, check.openOk);
	const text = resultText(key, { finerRange: hasFinerRange(meter, check, draft.rangeLabel) });
	const fmt = (v: number) => formatQuantity(v, displayQuantity(check), { locale });
	const advice =
		key === 'bad_zero'
			? 'Read the leads again, then the part.'
			: key === 'over_range'
				? 'OL here means over range, not open: switch one range up and read again.'
				: key === 'no_spec'
					? noFigureText(check.bands, temperature)
					: result.suspects.length
						? `${result.suspects.length === 1 ? 'A sample is' : 'Samples are'} far from the others and left out: take another sample.`
						: null;
	const unitWarn = typed && typed.value !== 'OL' && result.value !== null ? unitWarning(toBase(typed.value, typed.unit), bands, typed.unit) : null;
	return { result, key, text, bands, rangeWarning: warnRange, advice, unitWarning: unitWarn, canSave: maySave(key), meter: snapshot };
}

/** The spec of a band in words: "Cold spec 0.38 – 0.58 Ω". */
export function specText(b: SpecBand, check: Pick<CheckSpec, 'quantity'>, locale = 'en'): string {
	const fmt = (v: number | null) => (v == null ? null : formatQuantity(v, displayQuantity(check), { locale }));
	const [lo, hi] = [fmt(b.min), fmt(b.max)];
	const range = lo && hi ? `${lo} – ${hi}` : lo ? `at least ${lo}` : hi ? `at most ${hi}` : 'no limit';
	return `${bandShortName(b)} ${range}`;
}

/** How long ago the leads were read, in words ("just now", "12 min ago"); null when unknown. */
export function leadsAge(leadReadAt: string | null | undefined, now = Date.now()): string | null {
	if (!leadReadAt) return null;
	const s = Math.max(0, Math.round((now - new Date(leadReadAt).getTime()) / 1000));
	if (s < 45) return 'just now';
	if (s < 3600) return `${Math.round(s / 60)} min ago`;
	if (s < 86400) return `${Math.round(s / 3600)} h ago`;
	return 'more than a day ago';
}

/** A saved reading as the phone holds it. */
export type SavedReading = {
	id: string;
	data: {
		checkKey: string;
		position?: string | null;
		samples: Sample[];
		rangeLabel?: string | null;
		visual?: VisualFinding | null;
		serverResult?: { verdict: string; value: number | null } | null;
	};
};

/** One check across the positions: each position's value, ± and result, and the comparison. */
export type CompareRow = {
	check: FlowCheck;
	values: Record<string, { value: number | null; u: number; key: ResultKey }>;
	comparison: ReturnType<typeof comparePositions>;
};

/**
 * The results side by side: for each measured check, each position's settled value, its ±
 * and its result, and the odd one out (never within the combined ±).
 */
export function compareRows(
	checks: readonly FlowCheck[],
	positions: readonly string[],
	saved: Readonly<Record<string, SavedReading>>,
	meter: TestMeter,
	temperature: TemperatureSnapshot
): CompareRow[] {
	return checks
		.filter((c) => c.quantity !== 'spark')
		.map((check) => {
			const values: CompareRow['values'] = {};
			for (const p of positions) {
				const r = saved[`${p}|${check.key}`];
				if (!r) continue;
				const m = meterFor(meter, r.data.rangeLabel, rangeQuantityOf(check.quantity));
				const res = evaluateReading(check, r.data.samples, m, temperature, r.data.visual);
				values[p] = { value: res.value, u: res.u, key: resultKey(res.verdict, res.value, check.openOk) };
			}
			const measured = Object.entries(values).filter(([, v]) => v.value !== null && v.key !== 'bad_zero' && v.key !== 'over_range');
			const comparison = comparePositions(
				Object.fromEntries(measured.map(([p, v]) => [p, v.value as number])),
				undefined,
				Object.fromEntries(measured.map(([p, v]) => [p, v.u]))
			);
			return { check, values, comparison };
		});
}

/** The newest reading of each cell (`position|checkKey`). */
export function latestByCell<R extends SavedReading & { updatedAt: string }>(readings: readonly R[]): Record<string, R> {
	return Object.fromEntries(
		[...readings]
			.sort((a, b) => a.updatedAt.localeCompare(b.updatedAt))
			.map((r) => [`${r.data.position ?? '1'}|${r.data.checkKey}`, r])
	);
}

/** What the workshop's server made of a synced reading, where it differs from this phone. */
export function serverDisagreements(
	saved: Readonly<Record<string, SavedReading>>,
	cells: readonly Cell[],
	meter: TestMeter,
	temperature: TemperatureSnapshot
) {
	const out: { id: string; label: string; server: ResultKey }[] = [];
	let checked = 0;
	for (const cell of cells) {
		const r = saved[cell.key];
		const server = r?.data.serverResult;
		if (!r || !server) continue;
		checked++;
		const m = meterFor(meter, r.data.rangeLabel, rangeQuantityOf(cell.check.quantity));
		const mine = evaluateReading(cell.check, r.data.samples, m, temperature, r.data.visual);
		if (mine.verdict !== server.verdict) {
			out.push({ id: r.id, label: cell.label, server: resultKey(server.verdict as never, server.value, cell.check.openOk) });
		}
	}
	return { checked, differ: out };
}

/** What a new test needs before it starts; the first thing missing, in words, or null. */
export function startProblem(s: {
	part: { sheet: unknown | null } | null;
	refusal: string | null;
	leads: number | null;
	temperature: TemperatureSnapshot | null;
	relative: boolean;
	cautionNeedsTap: boolean;
	acknowledged: boolean;
}): string | null {
	if (!s.part || !s.part.sheet) return 'Pick a part with an approved spec sheet.';
	if (s.refusal) return s.refusal;
	if (s.leads === null || s.leads < 0)
		return s.relative
			? 'Enter what the leads read when you zeroed the meter.'
			: 'Short the tips, read the leads and enter the reading.';
	if (!s.temperature) return 'Choose the part’s temperature: measured, or what you know.';
	if (s.cautionNeedsTap && !s.acknowledged) return 'Read the caution and tick it first.';
	return null;
}
