/**
 * The capture flow's decisions, pure and shared by the screens and their tests: whether a
 * test may start, which cautions a step carries, whether a range can resolve a check,
 * whether a value looks typed in the wrong unit, the odd one out between cylinders, and
 * what a swap test shows. Values in base units (Ω).
 */
import { findOutliers } from '../domain/compare';
import { canResolve, type MeterRange } from '../domain/meter';
import { suspectUnit, type SpecBand, type Verdict } from '../domain/spec';
import { refuseHybridWork } from '../rules';

/** The product's words for a result (DESIGN §7), with a shape so colour is never alone. */
export const RESULT_WORDS: Record<Verdict | 'open' | 'depends' | 'no_spec', { word: string; shape: string; tone: 'ok' | 'bad' | 'warn' }> = {
	within: { word: 'OK', shape: '●', tone: 'ok' },
	low: { word: 'Under spec', shape: '▼', tone: 'bad' },
	high: { word: 'Over spec', shape: '▲', tone: 'bad' },
	open: { word: 'Open', shape: '○', tone: 'bad' },
	borderline: { word: 'Can’t tell — re-check on a lower range', shape: '◆', tone: 'warn' },
	depends: { word: 'Depends on the temperature — the specs disagree', shape: '◆', tone: 'warn' },
	no_spec: { word: 'No spec for this check', shape: '◇', tone: 'warn' }
};

/** The word to show for a reading: OL on a check that does not accept it is "Open". */
export function resultKey(verdict: Verdict | 'depends' | 'no_spec', value: number | null, openOk: boolean) {
	if (value === Infinity && !openOk) return 'open' as const;
	return verdict;
}

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
		return 'Airbag components are never tested with an ohmmeter: the meter’s current can fire the igniter. Follow the maker’s procedure and its diagnostic tool.';
	}
	return refuseHybridWork(c, c.hybrid);
}

export type Step = 'measure' | 'spark' | 'running' | 'battery';
const DEFER = 'Follow local regulations and the vehicle maker’s procedure.';
const CAUTIONS: Record<Step, string> = {
	measure: 'Ignition off before unplugging or measuring resistance. Back-probe the connector; never pierce the insulation.',
	spark:
		'Spark test: tens of kilovolts. Use an insulated, earthed spark tester and keep hands clear. Never fire a coil open-circuit. Unplug that cylinder’s injector; no fuel vapour nearby. People with pacemakers stay clear.',
	running: 'Engine running or hot: fans may start with the key out; keep clear of belts; hot coolant is under pressure; ventilate exhaust fumes.',
	battery: 'Battery: hydrogen gas — no sparks or flames; wear eye protection; earth lead off first and on last.'
};
const HIGH_VOLTAGE = 'Hybrid/EV: high voltage. Do not touch orange cables or high-voltage parts unless trained and authorised.';

/** The cautions shown at a step; `needsTap` when one is high-risk and must be acknowledged. */
export function cautionsFor(step: Step, { hybrid }: { hybrid: boolean }) {
	const list = [...(hybrid ? [HIGH_VOLTAGE] : []), CAUTIONS[step], DEFER];
	return { list, needsTap: hybrid || step === 'spark' };
}

/** Whether a range can tell a reading from the limits of every band that applies. */
export function rangeResolves(range: MeterRange, bands: readonly SpecBand[]): boolean {
	return bands.every((b) => canResolve(range, b));
}

/**
 * A warning before any reading when the range cannot resolve the check's limits in any
 * band that applies, with what to do; null when it can.
 */
export function rangeWarning(range: MeterRange & { label?: string }, bands: readonly SpecBand[]): string | null {
	if (rangeResolves(range, bands)) return null;
	return `The ${range.label ?? 'chosen'} range cannot tell a reading from this spec’s limits. Switch to a lower range with a finer resolution, or use the four-wire method.`;
}

/** A hint when a value looks typed in the wrong unit (e.g. kΩ typed as Ω); null otherwise. */
export function unitWarning(valueBase: number, bands: readonly SpecBand[]): string | null {
	for (const b of bands) {
		const s = suspectUnit(valueBase, b);
		if (s) {
			const hint = s.factor === 1e3 ? 'kΩ instead of Ω' : s.factor === 1e-3 ? 'Ω instead of kΩ' : 'another unit';
			return `This looks like ${hint}: check the unit before saving.`;
		}
	}
	return null;
}

/** Tolerance of the cylinder comparison: 10 % from the others (common practice). */
export const COMPARE_TOLERANCE = 0.1;

/**
 * Compare one check across positions of the same part number. Three or more: the odd ones
 * out (against the median of the others). Two: whether they differ by more than the
 * tolerance — never a culprit. Fewer: nothing to compare.
 */
export function comparePositions(values: Record<string, number>, tolerance = COMPARE_TOLERANCE) {
	const keys = Object.keys(values).filter((k) => !Number.isNaN(values[k]));
	if (keys.length >= 3) return { kind: 'odd' as const, odd: findOutliers(values, { tolerance, direction: 'both' }) };
	if (keys.length === 2) {
		const [a, b] = keys.map((k) => values[k]);
		const differ = Math.abs(a - b) > tolerance * Math.min(Math.abs(a), Math.abs(b));
		return { kind: 'pair' as const, differ };
	}
	return { kind: 'none' as const };
}

export type SwapConclusion = 'fault_followed' | 'fault_stayed' | 'inconclusive';

/**
 * What a swap test shows. The coil moved from position `from` to `to`; misfire counts per
 * position before and after. The misfire moving with the coil points at the coil; staying
 * at `from` points elsewhere (plug, injector, wiring); going away altogether is
 * inconclusive (an intermittent fault or a disturbed connection can do that).
 */
export function swapConclusion(from: string, to: string, before: Record<string, number>, after: Record<string, number>): SwapConclusion {
	const had = (before[from] ?? 0) > 0;
	const movedTo = (after[to] ?? 0) > (before[to] ?? 0);
	const stayed = (after[from] ?? 0) > 0;
	if (had && movedTo && !stayed) return 'fault_followed';
	if (had && stayed && !movedTo) return 'fault_stayed';
	return 'inconclusive';
}
