/**
 * The capture flow's decisions, pure and shared by the screens and their tests: whether a
 * test may start, whether a range can resolve a check, whether a value looks typed in the
 * wrong unit, what to say when the sheet has no figure, the odd one out between positions,
 * what a swap test shows, and the words of a spark test. Values in base units.
 * (Result words: results.ts; cautions: cautions.ts.)
 */
import { findOutliers } from '../domain/compare';
import { canResolve, type MeterRange } from '../domain/meter';
import { breakdownVoltage } from '../domain/spark';
import { suspectUnit, type SpecBand } from '../domain/spec';
import { UNIT_FACTORS, type Unit } from '../domain/units';
import { temperatureRangeText } from '../library/labels';
import { TEMPS, type TemperatureSnapshot } from './reading';
import { refuseHybridWork } from '../rules';

export { RESULTS, resultKey, resultText } from './results';

export type StartContext = {
	role: 'apprentice' | 'technician' | 'lead' | 'owner';
	hybrid: boolean;
	cautions: readonly string[];
};

/**
 * Why a test may not start, or null. Airbag parts are never ohm-tested; no apprentice HV
 * work (the shared rule `refuseHybridWork`, which the server applies to every test kind).
 */
export function refuseTest(c: StartContext): string | null {
	if (c.cautions.includes('airbag')) {
		return 'Airbag parts are never tested with an ohmmeter: the meter’s current can fire the igniter. Follow the maker’s procedure and its diagnostic tool.';
	}
	return refuseHybridWork(c, c.hybrid);
}

import { rangeResolves } from './reading';
export { rangeResolves };

/**
 * A warning before any reading when the range cannot resolve the check's limits in any
 * band that applies, with what to do; null when it can.
 */
export function rangeWarning(range: MeterRange & { label?: string }, bands: readonly SpecBand[]): string | null {
	if (rangeResolves(range, bands)) return null;
	return `The ${range.label ?? 'chosen'} range cannot tell a reading from this spec’s limits. Switch to a lower range with a finer resolution, or use the four-wire method.`;
}

/**
 * A hint when a value looks typed in the wrong unit (e.g. kΩ typed as Ω, mV as V); null
 * otherwise. `typedUnit` is the unit the value was typed in.
 */
export function unitWarning(valueBase: number, bands: readonly SpecBand[], typedUnit = 'Ω'): string | null {
	for (const b of bands) {
		const s = suspectUnit(valueBase, b);
		if (!s) continue;
		const typed = (UNIT_FACTORS as Record<string, number>)[typedUnit] ?? 1;
		const meant = (Object.keys(UNIT_FACTORS) as Unit[]).find(
			(u) => u.slice(-1) === typedUnit.slice(-1) && Math.abs(UNIT_FACTORS[u] / (typed * s.factor) - 1) < 1e-9
		);
		const hint = meant ? `${meant} instead of ${typedUnit}` : 'another unit';
		return `This looks like ${hint}: check the unit before saving.`;
	}
	return null;
}

const TEMPERATURE_WORDS = {
	overnight: `a part that stood overnight (about ${TEMPS.overnight} °C)`,
	just_run: `a part that has just run (about ${TEMPS.just_run} °C)`,
	warm: 'a warm part',
	unknown: 'an unknown temperature'
} as const;

/**
 * What to say when no band of the sheet applies: the temperature and what the sheet covers,
 * e.g. "No figure for 110 °C; the sheet covers below 50 °C and 50–100 °C".
 */
export function noFigureText(bands: readonly SpecBand[], t: TemperatureSnapshot): string {
	if (!bands.length) return 'The spec sheet gives no figure for this check.';
	const at = t.mode === 'measured' ? `${t.tempC} °C` : TEMPERATURE_WORDS[t.mode];
	const covered = [...bands]
		.sort((a, b) => (a.fromC ?? -Infinity) - (b.fromC ?? -Infinity))
		.map(temperatureRangeText);
	const list = covered.length > 1 ? `${covered.slice(0, -1).join(', ')} and ${covered.at(-1)}` : covered[0];
	return `No figure for ${at}; the sheet covers ${list}.`;
}

/** Tolerance of the position comparison: 10 % from the others (common practice). */
export const COMPARE_TOLERANCE = 0.1;

/**
 * Compare one check across positions of the same part number. Three or more: the odd ones
 * out (against the median of all three, or of the others from four on), never for a
 * difference within the readings' combined ± (`uncertainty`, by position). Two: whether they
 * differ by more than the tolerance and the combined ± — never a culprit. Fewer: nothing.
 */
export function comparePositions(
	values: Record<string, number>,
	tolerance = COMPARE_TOLERANCE,
	uncertainty: Record<string, number> = {}
) {
	const keys = Object.keys(values).filter((k) => !Number.isNaN(values[k]));
	if (keys.length >= 3) return { kind: 'odd' as const, odd: findOutliers(values, { tolerance, direction: 'both', uncertainty }) };
	if (keys.length === 2) {
		const [a, b] = keys.map((k) => values[k]);
		const combined = keys.reduce((sum, k) => sum + (uncertainty[k] ?? 0), 0);
		const gap = Math.abs(a - b);
		const differ = !Number.isFinite(gap) ? a !== b : gap > tolerance * Math.min(Math.abs(a), Math.abs(b)) && gap > combined;
		return { kind: 'pair' as const, differ };
	}
	return { kind: 'none' as const };
}

export type SwapConclusion = 'fault_followed' | 'fault_stayed' | 'inconclusive';
/** What a swap test found, in more detail than the stored conclusion. */
export type SwapFinding = 'followed' | 'stayed' | 'no_misfire_before' | 'went_away' | 'unclear';

/**
 * What a swap test shows. The coil moved from position `from` to `to`; misfire counts per
 * position before and after. The misfire moving with the coil points at the coil; staying
 * at `from` points at that cylinder (plug, injector, compression, valves); no misfire at
 * `from` before the swap leaves nothing to compare; going away altogether, or showing on both
 * or elsewhere, is inconclusive (an intermittent fault or a disturbed connection can do that).
 */
export function swapFinding(from: string, to: string, before: Record<string, number>, after: Record<string, number>): SwapFinding {
	const had = (before[from] ?? 0) > 0;
	if (!had) return 'no_misfire_before';
	const movedTo = (after[to] ?? 0) > (before[to] ?? 0);
	const stayed = (after[from] ?? 0) > 0;
	if (movedTo && !stayed) return 'followed';
	if (stayed && !movedTo) return 'stayed';
	if (!stayed && !movedTo) return 'went_away';
	return 'unclear';
}

/** The conclusion stored with a swap test. */
export function swapConclusion(from: string, to: string, before: Record<string, number>, after: Record<string, number>): SwapConclusion {
	const f = swapFinding(from, to, before, after);
	return f === 'followed' ? 'fault_followed' : f === 'stayed' ? 'fault_stayed' : 'inconclusive';
}

/** The message for a swap finding; `from` and `to` are position labels ("cylinder 3"). */
export function swapMessage(f: SwapFinding, from: string, to: string): string {
	switch (f) {
		case 'followed':
			return `The misfire followed the coil from ${from} to ${to}: the coil is the likely cause.`;
		case 'stayed':
			return `The misfire stayed with ${from}: the coil is not the cause. Look at that cylinder’s plug, injector, compression and valves, and its wiring.`;
		case 'no_misfire_before':
			return `No misfire was counted on ${from} before the swap, so there is nothing to compare. Run the engine until the misfire shows, then move the coil.`;
		case 'went_away':
			return 'Inconclusive: the misfire went away after the swap. A disturbed connection or an intermittent fault can do that — re-test later.';
		case 'unclear':
			return 'Inconclusive: the misfire showed on both cylinders or moved elsewhere. Check the counters and the running conditions, and repeat.';
	}
}

/** A spark test's outcomes in words the technician can match to what they see. */
export const SPARK_OUTCOMES = {
	go: { word: 'Go', describe: 'a bright blue-white spark that snaps across the gap every time' },
	weak: { word: 'Weak', describe: 'a thin, yellow or red spark, or one that misses now and then' },
	none: { word: 'No spark', describe: 'nothing jumps the gap' }
} as const;

/**
 * The rough voltage to jump a tester gap, in words, with what it assumes: Paschen's law for
 * a plain (uniform-field) gap in still air at sea-level pressure; a needle tester's pointed
 * electrode breaks down at less, so it is an upper figure. `null` for no gap.
 */
export function sparkEstimate(gapMm: number | null): string | null {
	if (gapMm == null || !(gapMm > 0)) return null;
	const kv = breakdownVoltage(gapMm / 1000) / 1000;
	if (!Number.isFinite(kv)) return null;
	const gap = String(gapMm).replace(/\.0+$/, '');
	return `Up to about ${kv.toFixed(0)} kV to jump ${gap} mm — worked out for a plain gap in still air at sea level; a tester’s pointed electrode needs less.`;
}

/** A pack's coil and the cylinders it serves. */
export type CoilPosition = { position: string; cylinders: number[] };

/** A position in words: "Coil A (cyl 1 & 4)" for a pack's coil, "Cylinder 3" otherwise. */
export function positionLabel(position: string, coils: readonly CoilPosition[] = []): string {
	const coil = coils.find((c) => c.position === position);
	if (!coil) return `Cylinder ${position}`;
	return `Coil ${coil.position} (cyl ${coil.cylinders.join(' & ')})`;
}

/** The usual cylinder count when the vehicle's is not recorded (common practice: four). */
export const DEFAULT_CYLINDERS = 4;

/**
 * The cylinders a spark or swap test offers: those a pack's coils serve (its positions
 * limit it), else as many as the vehicle has (four when not recorded).
 */
export function cylindersFor(vehicleCylinders: number | null | undefined, coils: readonly CoilPosition[] = []): number[] {
	if (coils.length) return [...new Set(coils.flatMap((c) => c.cylinders))].sort((a, b) => a - b);
	const n = vehicleCylinders && vehicleCylinders > 0 ? vehicleCylinders : DEFAULT_CYLINDERS;
	return Array.from({ length: n }, (_, i) => i + 1);
}

/**
 * The tester gap a spec sheet gives, in mm: a spark check in mm whose band has a limit (the
 * gap the maker tests at). `null` when the sheet gives none.
 */
export function sheetGapMm(checks: readonly { quantity: string; unit: string | null; bands: readonly SpecBand[] }[]): number | null {
	for (const c of checks) {
		if (c.quantity !== 'spark' || c.unit !== 'mm') continue;
		const b = c.bands.find((x) => x.min != null || x.max != null);
		if (b) return Math.round((b.min ?? b.max)! * 1e6) / 1e3; // stored in metres
	}
	return null;
}
