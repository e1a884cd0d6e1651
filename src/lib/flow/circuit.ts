/**
 * The day's other tests — battery, parasitic draw, voltage drop, charging, relay, crank or cam
 * sensor — as one table of steps per kind and one pure judge, used on the phone and again on
 * the server (which recomputes what the phone showed and keeps both).
 *
 * A kind is a list of steps; each step asks for a few figures (`Field`). Limits are figures
 * too: each has a default with where it comes from, and the technician types the maker's own
 * figure over it when the vehicle's information gives one (the figure used is stored with the
 * test, so the server judges the same inputs). The result is a verdict, a sentence and the
 * working, line by line, in SI units shown as a technician reads them.
 */
import { z } from 'zod';
import {
	crankingCapability,
	daysToFlat,
	dropResistance,
	j541DropLimit,
	loadTestMinimum,
	MIN_SOC_TO_JUDGE,
	REST_VOLTS_PER_C,
	stateOfChargeDetail,
	type BatteryType
} from '../domain/battery';
import { SHAPE } from '../shapes';
import { parseDecimal } from '../domain/units';

export const CIRCUIT_KINDS = ['battery', 'parasitic', 'drop', 'charging', 'relay', 'sensor'] as const;
export type CircuitKind = (typeof CIRCUIT_KINDS)[number];

/** What a result says, in the product's words with its shape (see `shapes.ts`). */
export type CircuitVerdict = 'ok' | 'low' | 'high' | 'not_ok' | 'charge_retest' | 'cant_tell';
export const VERDICT_WORDS: Record<CircuitVerdict, { word: string; shape: string; tone: 'ok' | 'bad' | 'cant_tell' }> = {
	ok: { word: 'OK', shape: SHAPE.ok, tone: 'ok' },
	low: { word: 'Under spec', shape: SHAPE.low, tone: 'bad' },
	high: { word: 'Over spec', shape: SHAPE.high, tone: 'bad' },
	not_ok: { word: 'Not OK', shape: SHAPE.seen, tone: 'bad' },
	charge_retest: { word: 'Charge and re-test', shape: SHAPE.cantTell, tone: 'cant_tell' },
	cant_tell: { word: 'Can’t tell', shape: SHAPE.cantTell, tone: 'cant_tell' }
};

/** One figure or choice a step asks for. `unit` is what the technician types in. */
export type Field =
	| {
			key: string;
			label: string;
			type: 'number';
			unit: string;
			min: number;
			max: number;
			default?: number;
			source?: string;
			optional?: boolean;
			/** The sheet's check (by key) whose first band's min or max fills this limit. */
			sheet?: { check: string; take: 'min' | 'max' };
	  }
	| { key: string; label: string; type: 'choice'; options: { value: string; label: string }[]; default?: string }
	| { key: string; label: string; type: 'confirm' }
	| { key: string; label: string; type: 'fuses' }
	| { key: string; label: string; type: 'wait'; minutesKey: string };

/** Which caution set a step carries (see `cautions.ts`, step `circuit`). */
export type StepCaution = 'battery' | 'running' | 'cranking' | 'in_series' | 'back_probe' | 'key_off';

export type Step = {
	title: string;
	/** What to do, in one or two sentences. */
	how: string;
	cautions: StepCaution[];
	fields: Field[];
	/** The drawing of where the probes go (voltage drop). */
	drawing?: 'drop';
	/** Only shown when this choice field has this value. */
	when?: { key: string; value: string };
};

/** `part`: the library's kind of part whose sheet gives this test's limits. */
export type KindSpec = { title: string; button: string; part?: string; steps: Step[] };

const yesNo = [
	{ value: 'yes', label: 'Yes' },
	{ value: 'no', label: 'No' }
];

export const PARASITIC_WAIT_SOURCE = 'common practice; makers give about 5 to 75 minutes — use the vehicle’s figure';
export const PARASITIC_LIMIT_SOURCE = 'common practice; makers give 10 to 85 mA, most often 50 mA — use the vehicle’s figure';
export const USABLE_SOURCE = 'common practice: below about half charge a battery often will not crank a cold engine';
export const DROP_LIMIT_SOURCE = 'common practice (vehicle makers’ service information): 0.5 V per side while cranking';
export const CHARGING_SOURCE = 'common practice: 13.5–14.8 V unless the vehicle’s sheet says otherwise';
export const RIPPLE_SOURCE = 'common practice: under 0.5 V AC; no published limit';
export const CONDUCTANCE_SOURCE = 'common practice (from memory): a battery giving under 75 % of its label rating is worn';
export const RELAY_COIL_SOURCE = 'relay makers’ data sheets: 12 V mini relay coil about 85 Ω ± 10 %';
export const RELAY_CONTACT_SOURCE = 'relay makers’ data sheets: at most 0.2 V across closed contacts at 10 A';
export const HALL_SOURCE = 'common practice: 0–5 V square, low under 0.3–2.0 V, high over 3.8 V — the sheet says which';

/** The steps of every kind: the one table the capture screen draws. */
export const KINDS: Record<CircuitKind, KindSpec> = {
	battery: {
		title: 'Battery test',
		button: 'Battery',
		part: 'battery',
		steps: [
			{
				title: 'The battery’s label',
				how: 'Type the figures printed on the battery.',
				cautions: ['battery'],
				fields: [
					{ key: 'batteryType', label: 'Battery type', type: 'choice', options: [{ value: 'flooded', label: 'Flooded' }, { value: 'efb', label: 'EFB' }, { value: 'agm', label: 'AGM' }], default: 'flooded' },
					{ key: 'standard', label: 'Cranking rating on the label', type: 'choice', options: [{ value: 'sae_j537', label: 'CCA (SAE J537)' }, { value: 'en_50342_1', label: 'EN (EN 50342-1)' }], default: 'en_50342_1' },
					{ key: 'ratedA', label: 'Rating on the label', type: 'number', unit: 'A', min: 50, max: 2000 },
					{ key: 'tempC', label: 'Battery temperature', type: 'number', unit: '°C', min: -30, max: 60 }
				]
			},
			{
				title: 'Rest voltage',
				how: 'Remove the surface charge first: at rest 6 hours or more, or headlamps on for 15 s and then wait up to 5 minutes. Read across the posts.',
				cautions: ['battery'],
				fields: [
					{ key: 'surfaceGone', label: 'The surface charge is gone (rested, or headlamps 15 s and a wait)', type: 'confirm' },
					{ key: 'restV', label: 'Rest voltage', type: 'number', unit: 'V', min: 0, max: 16 }
				]
			},
			{
				title: 'Load or conductance',
				how: 'Either a load test at half the rating for 15 s, or a conductance tester set to the label’s rating and standard.',
				cautions: ['battery'],
				fields: [
					{ key: 'method', label: 'How', type: 'choice', options: [{ value: 'conductance', label: 'Conductance tester' }, { value: 'load', label: 'Load test' }], default: 'conductance' },
					{ key: 'measuredA', label: 'Tester’s result (same standard as the label)', type: 'number', unit: 'A', min: 0, max: 2000, optional: true },
					{ key: 'minCapability', label: 'Least share of the rating', type: 'number', unit: '%', min: 1, max: 100, default: 75, source: CONDUCTANCE_SOURCE },
					{ key: 'loadV', label: 'Lowest voltage during the 15 s load', type: 'number', unit: 'V', min: 0, max: 16, optional: true }
				]
			},
			{
				title: 'Cranking voltage',
				how: 'Disable the engine from starting (the maker’s way), crank for a few seconds and read the lowest voltage across the posts.',
				cautions: ['battery', 'cranking'],
				fields: [{ key: 'crankV', label: 'Lowest voltage while cranking', type: 'number', unit: 'V', min: 0, max: 16, optional: true }]
			}
		]
	},
	parasitic: {
		title: 'Parasitic draw',
		button: 'Parasitic draw',
		steps: [
			{
				title: 'Set up',
				how: 'Doors shut with the latches closed, everything off, the meter in series at the battery’s earth post on its amps input. Start the wait and leave the car alone.',
				cautions: ['battery', 'in_series'],
				fields: [
					{ key: 'capacityAh', label: 'Battery capacity (label)', type: 'number', unit: 'Ah', min: 10, max: 300 },
					{ key: 'waitMin', label: 'Wait for the modules to sleep', type: 'number', unit: 'min', min: 0, max: 120, default: 45, source: PARASITIC_WAIT_SOURCE },
					{ key: 'wait', label: 'Modules asleep', type: 'wait', minutesKey: 'waitMin' }
				]
			},
			{
				title: 'The draw',
				how: 'Read the current once the wait is over.',
				cautions: ['in_series'],
				fields: [
					{ key: 'drawMa', label: 'Current drawn', type: 'number', unit: 'mA', min: 0, max: 20000 },
					{ key: 'limitMa', label: 'Most the vehicle may draw', type: 'number', unit: 'mA', min: 1, max: 500, default: 50, source: PARASITIC_LIMIT_SOURCE },
					{ key: 'usablePct', label: 'Share of the capacity usable before it will not crank', type: 'number', unit: '%', min: 10, max: 100, default: 50, source: USABLE_SOURCE }
				]
			},
			{
				title: 'Fuse by fuse',
				how: 'With the meter still in, read the millivolts across each fuse without pulling it; the fuse with the most is on the circuit that draws.',
				cautions: ['back_probe'],
				fields: [{ key: 'fuses', label: 'Millivolts across each fuse', type: 'fuses' }]
			}
		]
	},
	drop: {
		title: 'Voltage drop',
		button: 'Voltage drop',
		steps: [
			{
				title: 'The circuit',
				how: 'Name the circuit and how it is loaded. The drop is only there while current flows.',
				cautions: ['back_probe'],
				fields: [
					{ key: 'circuit', label: 'Circuit', type: 'choice', options: [{ value: 'starter', label: 'Starter' }, { value: 'coil', label: 'Coil feed' }, { value: 'charging', label: 'Charging' }, { value: 'other', label: 'Other' }], default: 'starter' },
					{ key: 'condition', label: 'Loaded by', type: 'choice', options: [{ value: 'cranking', label: 'Cranking' }, { value: 'under_load', label: 'Under load' }], default: 'cranking' },
					{ key: 'limitV', label: 'Most drop per side', type: 'number', unit: 'V', min: 0.01, max: 2, default: 0.5, source: DROP_LIMIT_SOURCE }
				]
			},
			{
				title: 'Feed and earth side',
				how: 'Feed: red probe on the battery’s + post (not the clamp), black on the part’s feed. Earth: red on the part’s body or earth, black on the battery’s − post.',
				cautions: ['back_probe', 'cranking'],
				drawing: 'drop',
				fields: [
					{ key: 'feedV', label: 'Feed side drop', type: 'number', unit: 'V', min: 0, max: 12 },
					{ key: 'earthV', label: 'Earth side drop', type: 'number', unit: 'V', min: 0, max: 12 },
					{ key: 'currentA', label: 'Current (clamp meter), if read', type: 'number', unit: 'A', min: 0, max: 2000, optional: true }
				]
			}
		]
	},
	charging: {
		title: 'Charging test',
		button: 'Charging',
		part: 'alternator',
		steps: [
			{
				title: 'Limits',
				how: 'Use the vehicle’s sheet; the figures below are the usual ones.',
				cautions: ['battery'],
				fields: [
					{ key: 'minV', label: 'Lowest regulated voltage', type: 'number', unit: 'V', min: 11, max: 16, default: 13.5, source: CHARGING_SOURCE, sheet: { check: 'regulated', take: 'min' } },
					{ key: 'maxV', label: 'Highest regulated voltage', type: 'number', unit: 'V', min: 11, max: 16, default: 14.8, source: CHARGING_SOURCE, sheet: { check: 'regulated', take: 'max' } },
					{ key: 'rippleMaxV', label: 'Most AC ripple', type: 'number', unit: 'V', min: 0.01, max: 5, default: 0.5, source: RIPPLE_SOURCE, sheet: { check: 'ripple', take: 'max' } }
				]
			},
			{
				title: 'Engine at idle',
				how: 'Engine running at idle. Read across the battery posts: first with every load off, then with headlamps, blower and rear screen heater on.',
				cautions: ['running'],
				fields: [
					{ key: 'offV', label: 'Idle, loads off', type: 'number', unit: 'V', min: 0, max: 20 },
					{ key: 'onV', label: 'Idle, loads on', type: 'number', unit: 'V', min: 0, max: 20 },
					{ key: 'rippleV', label: 'AC ripple (meter on V AC)', type: 'number', unit: 'V', min: 0, max: 20 }
				]
			}
		]
	},
	relay: {
		title: 'Relay test',
		button: 'Relay',
		part: 'relay',
		steps: [
			{
				title: 'Coil',
				how: 'Relay out of its socket: measure across the coil’s pins (85 and 86 on a mini relay).',
				cautions: ['key_off'],
				fields: [
					{ key: 'coilOhm', label: 'Coil resistance', type: 'number', unit: 'Ω', min: 0, max: 100000 },
					{ key: 'coilMin', label: 'Coil at least', type: 'number', unit: 'Ω', min: 0, max: 100000, default: 76.5, source: RELAY_COIL_SOURCE, sheet: { check: 'coil', take: 'min' } },
					{ key: 'coilMax', label: 'Coil at most', type: 'number', unit: 'Ω', min: 0, max: 100000, default: 93.5, source: RELAY_COIL_SOURCE, sheet: { check: 'coil', take: 'max' } },
					{ key: 'clicks', label: 'It clicks with 12 V on the coil', type: 'choice', options: yesNo, default: 'yes' }
				]
			},
			{
				title: 'Contacts under load',
				how: 'Relay back in, circuit switched on: read across the closed contacts (30 and 87).',
				cautions: ['back_probe'],
				fields: [
					{ key: 'contactV', label: 'Drop across the closed contacts', type: 'number', unit: 'V', min: 0, max: 14 },
					{ key: 'contactMaxV', label: 'Most drop', type: 'number', unit: 'V', min: 0.01, max: 2, default: 0.2, source: RELAY_CONTACT_SOURCE, sheet: { check: 'contacts', take: 'max' } }
				]
			}
		]
	},
	sensor: {
		title: 'Crank or cam sensor',
		button: 'Crank/cam sensor',
		part: 'crank_cam_sensor',
		steps: [
			{
				title: 'Which sensor',
				how: 'The sheet says whether it is an inductive (two wires, makes its own AC) or a Hall sensor (three wires: supply, earth, signal).',
				cautions: [],
				fields: [
					{ key: 'which', label: 'Sensor', type: 'choice', options: [{ value: 'crank', label: 'Crank' }, { value: 'cam', label: 'Cam' }], default: 'crank' },
					{ key: 'sensorType', label: 'Type', type: 'choice', options: [{ value: 'inductive', label: 'Inductive' }, { value: 'hall', label: 'Hall' }], default: 'inductive' }
				]
			},
			{
				title: 'Inductive: winding and output',
				how: 'Unplugged: resistance on the sensor’s own pins. Plugged in and back-probed: AC volts while cranking.',
				cautions: ['key_off', 'cranking'],
				when: { key: 'sensorType', value: 'inductive' },
				fields: [
					{ key: 'ohms', label: 'Resistance', type: 'number', unit: 'Ω', min: 0, max: 100000 },
					{ key: 'ohmMin', label: 'Sheet: at least', type: 'number', unit: 'Ω', min: 0, max: 100000, sheet: { check: 'winding', take: 'min' } },
					{ key: 'ohmMax', label: 'Sheet: at most', type: 'number', unit: 'Ω', min: 0, max: 100000, sheet: { check: 'winding', take: 'max' } },
					{ key: 'acV', label: 'AC output while cranking', type: 'number', unit: 'V', min: 0, max: 100 },
					{ key: 'acMinV', label: 'Sheet: AC at least', type: 'number', unit: 'V', min: 0, max: 100, sheet: { check: 'ac_output', take: 'min' } }
				]
			},
			{
				title: 'Hall: supply, earth and signal',
				how: 'Plugged in, back-probed, key on: supply to earth, the earth wire’s drop to the battery − post, then the signal low and high while turning the engine slowly or cranking.',
				cautions: ['back_probe', 'cranking'],
				when: { key: 'sensorType', value: 'hall' },
				fields: [
					{ key: 'supplyV', label: 'Supply', type: 'number', unit: 'V', min: 0, max: 16 },
					{ key: 'supplyNominal', label: 'Supply should be', type: 'choice', options: [{ value: '5', label: '5 V' }, { value: '12', label: 'Battery (12 V)' }], default: '5' },
					{ key: 'earthV', label: 'Earth wire drop', type: 'number', unit: 'V', min: 0, max: 12 },
					{ key: 'lowV', label: 'Signal low', type: 'number', unit: 'V', min: 0, max: 16 },
					{ key: 'highV', label: 'Signal high', type: 'number', unit: 'V', min: 0, max: 16 }
				]
			}
		]
	}
};

/** The figures of a test as stored: numbers, choices ('yes'/'no' for confirms), fuses. */
export type FuseReading = { fuse: string; mv: number };
export type CircuitInputs = Record<string, number | string | boolean | FuseReading[] | null | undefined>;

/** The inputs as sync carries them: plain values only, a bounded size. */
export const circuitInputs = z.record(
	z.string().regex(/^[a-zA-Z]{1,30}$/),
	z.union([
		z.number().finite(),
		z.string().max(60),
		z.boolean(),
		z.null(),
		z.array(z.object({ fuse: z.string().trim().min(1).max(30), mv: z.number().finite().min(0).max(20000) })).max(80)
	])
);

/**
 * One thing judged: `text` as the technician reads it; `value` (what was measured) and `spec`
 * (what it was judged against) apart, for the customer's report. Results stored before
 * `value` and `spec` existed carry `text` only.
 */
export type CircuitLine = { label: string; verdict: CircuitVerdict; text: string; value?: string; spec?: string };
export type CircuitResult = {
	verdict: CircuitVerdict;
	/** The one sentence that says what it means. */
	summary: string;
	/** One line per thing judged, each with its own verdict. */
	lines: CircuitLine[];
	/** The working, line by line. */
	working: string[];
	/** Fuses ranked, most millivolts first (parasitic draw). */
	ranked?: FuseReading[];
	/** Days to flat (parasitic draw). */
	days?: number;
	/** The side to look at (voltage drop): the one over its limit, the larger drop if both. */
	side?: 'feed' | 'earth';
};

const num = (i: CircuitInputs, k: string): number | null => {
	const v = i[k];
	return typeof v === 'number' && Number.isFinite(v) ? v : null;
};
const str = (i: CircuitInputs, k: string): string | null => (typeof i[k] === 'string' ? (i[k] as string) : null);

/** A figure as a technician reads it: decimal point, trailing zeros kept to `d` places. */
export const fmt = (v: number, d = 2) => v.toFixed(d);
const pct = (f: number) => `${Math.round(f * 100)} %`;

/** The worst verdict of a list: any bad one beats can't-tell, which beats OK. */
function worst(lines: CircuitLine[]): CircuitVerdict {
	const order: CircuitVerdict[] = ['charge_retest', 'cant_tell', 'high', 'low', 'not_ok', 'ok'];
	const bad = lines.find((l) => l.verdict === 'charge_retest');
	if (bad) return 'charge_retest';
	const fault = lines.find((l) => VERDICT_WORDS[l.verdict].tone === 'bad');
	if (fault) return fault.verdict;
	if (lines.some((l) => l.verdict === 'cant_tell')) return 'cant_tell';
	return lines.length ? order[order.length - 1] : 'cant_tell';
}

/** A figure against a band: under, over or OK. */
function band(value: number, min: number | null, max: number | null): CircuitVerdict {
	if (min != null && value < min) return 'low';
	if (max != null && value > max) return 'high';
	return 'ok';
}

const STANDARD_WORDS: Record<string, string> = { sae_j537: 'CCA, SAE J537', en_50342_1: 'EN 50342-1' };

function judgeBattery(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	const type = (str(i, 'batteryType') ?? 'flooded') as BatteryType;
	const tempC = num(i, 'tempC');
	const restV = num(i, 'restV');
	if (restV == null || tempC == null || i.surfaceGone !== true) {
		const why = i.surfaceGone !== true ? 'remove the surface charge and read the rest voltage' : 'type the rest voltage and the battery’s temperature';
		return { verdict: 'cant_tell', summary: `Can’t tell — ${why}.`, lines, working };
	}
	const soc = stateOfChargeDetail(restV, type, tempC);
	working.push(
		`Rest ${fmt(restV)} V at ${fmt(tempC, 0)} °C → ${fmt(soc.correctedVolts)} V at ${fmt(soc.table.refC, 1)} °C (${fmt(REST_VOLTS_PER_C * 1000, 1)} mV per °C, battery makers’ correction)`,
		`${fmt(soc.correctedVolts)} V → ${soc.atMost ? 'at most ' : ''}${pct(soc.fraction)} charged (${soc.table.source})`
	);
	const judgeable = soc.fraction >= MIN_SOC_TO_JUDGE && !soc.atMost;
	lines.push({
		label: 'State of charge',
		verdict: judgeable ? 'ok' : 'charge_retest',
		text: `${soc.atMost ? 'at most ' : ''}${pct(soc.fraction)}`,
		value: `${soc.atMost ? 'at most ' : ''}${pct(soc.fraction)}`,
		spec: `at least ${pct(MIN_SOC_TO_JUDGE)} to judge the battery`
	});
	if (!judgeable) {
		working.push(`Under ${pct(MIN_SOC_TO_JUDGE)}: a load or conductance result would say nothing about the battery’s health (common practice).`);
		return {
			verdict: 'charge_retest',
			summary: `Charge and re-test — the battery is ${soc.atMost ? 'at most ' : ''}${pct(soc.fraction)} charged, too low to judge it.`,
			lines,
			working
		};
	}
	const rated = num(i, 'ratedA');
	const standard = STANDARD_WORDS[str(i, 'standard') ?? ''] ?? 'the label’s standard';
	if (str(i, 'method') === 'load') {
		const loadV = num(i, 'loadV');
		if (loadV != null) {
			const min = loadTestMinimum(tempC);
			const v = loadV >= min ? 'ok' : 'low';
			working.push(`Load test at half the rating${rated ? ` (${fmt(rated / 2, 0)} A)` : ''} for 15 s: at least ${fmt(min)} V at ${fmt(tempC, 0)} °C (common practice, vehicle makers’ service information)`);
			lines.push({ label: 'Under load', verdict: v, text: `${fmt(loadV)} V, at least ${fmt(min)} V`, value: `${fmt(loadV)} V`, spec: `at least ${fmt(min)} V` });
		}
	} else {
		const measured = num(i, 'measuredA');
		const minShare = (num(i, 'minCapability') ?? 75) / 100;
		if (measured != null && rated) {
			const share = crankingCapability(measured, rated);
			working.push(`${fmt(measured, 0)} A ÷ ${fmt(rated, 0)} A (${standard}) = ${pct(share)} of the rating; at least ${pct(minShare)} (${CONDUCTANCE_SOURCE})`);
			lines.push({
				label: 'Cranking capability',
				verdict: share >= minShare ? 'ok' : 'low',
				text: `${fmt(measured, 0)} A of ${fmt(rated, 0)} A ${standard} (${pct(share)})`,
				value: `${fmt(measured, 0)} A (${pct(share)} of ${fmt(rated, 0)} A ${standard})`,
				spec: `at least ${pct(minShare)} of ${fmt(rated, 0)} A`
			});
		}
	}
	const crankV = num(i, 'crankV');
	if (crankV != null) {
		const min = loadTestMinimum(tempC);
		working.push(`Cranking: at least ${fmt(min)} V at ${fmt(tempC, 0)} °C (the load-test table, common practice)`);
		lines.push({ label: 'Cranking voltage', verdict: crankV >= min ? 'ok' : 'low', text: `${fmt(crankV)} V, at least ${fmt(min)} V`, value: `${fmt(crankV)} V`, spec: `at least ${fmt(min)} V` });
	}
	if (lines.length === 1) return { verdict: 'cant_tell', summary: 'Can’t tell — add a load or conductance result.', lines, working };
	const verdict = worst(lines);
	const summary = verdict === 'ok' ? 'Battery OK: charged and delivering its rating.' : `The battery does not hold up: ${lines.filter((l) => l.verdict !== 'ok').map((l) => l.label.toLowerCase()).join(' and ')} under the limit. Replace it.`;
	return { verdict, summary, lines, working };
}

function judgeParasitic(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	const drawMa = num(i, 'drawMa');
	const limitMa = num(i, 'limitMa') ?? 50;
	const capacity = num(i, 'capacityAh');
	const usable = (num(i, 'usablePct') ?? 50) / 100;
	const fuses = Array.isArray(i.fuses) ? (i.fuses as FuseReading[]) : [];
	const ranked = [...fuses].sort((a, b) => b.mv - a.mv);
	if (drawMa == null) return { verdict: 'cant_tell', summary: 'Can’t tell — read the current once the modules sleep.', lines, working, ranked };
	const v = drawMa > limitMa ? 'high' : 'ok';
	lines.push({ label: 'Draw', verdict: v, text: `${fmt(drawMa, 0)} mA, at most ${fmt(limitMa, 0)} mA`, value: `${fmt(drawMa, 0)} mA`, spec: `at most ${fmt(limitMa, 0)} mA` });
	let days: number | undefined;
	if (capacity != null && drawMa > 0) {
		days = daysToFlat(capacity, drawMa / 1000, usable);
		const ah = capacity * usable;
		working.push(
			`${fmt(capacity, 0)} Ah × ${pct(usable)} usable = ${fmt(ah, 1)} Ah`,
			`${fmt(ah, 1)} Ah ÷ ${fmt(drawMa / 1000, 3)} A = ${fmt(ah / (drawMa / 1000), 0)} h`,
			`${fmt(ah / (drawMa / 1000), 0)} h ÷ 24 = ${fmt(days, 1)} days`
		);
	}
	if (ranked.length && ranked[0].mv > 0) working.push(`Most millivolts: fuse ${ranked[0].fuse} (${fmt(ranked[0].mv, 1)} mV) — start there.`);
	const daysText = days != null ? ` A healthy battery would be too flat to crank after about ${fmt(days, 1)} days.` : '';
	const summary = v === 'ok' ? `Draw within the limit.${daysText}` : `Draw too high: ${fmt(drawMa, 0)} mA against ${fmt(limitMa, 0)} mA.${daysText}${ranked.length ? ` Look first at fuse ${ranked[0].fuse}.` : ''}`;
	return { verdict: v, summary, lines, working, ranked, days };
}

const CIRCUIT_WORDS: Record<string, string> = { starter: 'starter', coil: 'coil feed', charging: 'charging', other: 'circuit' };

function judgeDrop(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	const limit = num(i, 'limitV') ?? 0.5;
	const feed = num(i, 'feedV');
	const earth = num(i, 'earthV');
	const current = num(i, 'currentA');
	const circuit = CIRCUIT_WORDS[str(i, 'circuit') ?? 'other'] ?? 'circuit';
	if (feed == null || earth == null) return { verdict: 'cant_tell', summary: 'Can’t tell — read both sides while the circuit carries its current.', lines, working };
	lines.push({ label: 'Feed side', verdict: band(feed, null, limit), text: `${fmt(feed)} V, at most ${fmt(limit)} V`, value: `${fmt(feed)} V`, spec: `at most ${fmt(limit)} V` });
	lines.push({ label: 'Earth side', verdict: band(earth, null, limit), text: `${fmt(earth)} V, at most ${fmt(limit)} V`, value: `${fmt(earth)} V`, spec: `at most ${fmt(limit)} V` });
	if (current != null && current > 0) {
		working.push(`Feed: ${fmt(feed)} V ÷ ${fmt(current, 0)} A = ${fmt(dropResistance(feed, current) * 1000, 1)} mΩ (Ohm’s law)`);
		working.push(`Earth: ${fmt(earth)} V ÷ ${fmt(current, 0)} A = ${fmt(dropResistance(earth, current) * 1000, 1)} mΩ`);
		if (str(i, 'circuit') === 'starter') {
			const j = j541DropLimit(current);
			working.push(`SAE J541: at most ${fmt(j)} V for the whole starting circuit at ${fmt(current, 0)} A (0.2 V per 100 A); here ${fmt(feed + earth)} V`);
		}
	}
	const over = lines.filter((l) => l.verdict !== 'ok');
	if (!over.length) return { verdict: 'ok', summary: `Both sides of the ${circuit} within ${fmt(limit)} V.`, lines, working };
	const side = over.length === 2 ? (feed >= earth ? 'feed' : 'earth') : over[0].label === 'Feed side' ? 'feed' : 'earth';
	const other = side === 'feed' ? 'earth' : 'feed';
	const summary = `Too much drop on the ${circuit}’s ${side} side${over.length === 2 ? ` (and the ${other} side)` : ''}: clean and tighten the connections on that side, then test again.`;
	return { verdict: 'high', summary, lines, working, side };
}

function judgeCharging(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	const min = num(i, 'minV') ?? 13.5;
	const max = num(i, 'maxV') ?? 14.8;
	const rippleMax = num(i, 'rippleMaxV') ?? 0.5;
	for (const [k, label] of [['offV', 'Idle, loads off'], ['onV', 'Idle, loads on']] as const) {
		const v = num(i, k);
		if (v != null) lines.push({ label, verdict: band(v, min, max), text: `${fmt(v)} V, ${fmt(min)}–${fmt(max)} V`, value: `${fmt(v)} V`, spec: `${fmt(min)}–${fmt(max)} V` });
	}
	const ripple = num(i, 'rippleV');
	if (ripple != null) lines.push({ label: 'AC ripple', verdict: band(ripple, null, rippleMax), text: `${fmt(ripple)} V AC, at most ${fmt(rippleMax)} V`, value: `${fmt(ripple)} V AC`, spec: `at most ${fmt(rippleMax)} V AC` });
	if (lines.length < 3) return { verdict: 'cant_tell', summary: 'Can’t tell — read the voltage with loads off and on, and the ripple.', lines, working };
	const off = num(i, 'offV')!;
	const on = num(i, 'onV')!;
	working.push(`The loads took ${fmt(off - on)} V off the regulated voltage.`);
	const verdict = worst(lines);
	const ripOver = ripple! > rippleMax;
	const summary =
		verdict === 'ok'
			? 'Charging OK: regulated within the limits with and without loads, ripple low.'
			: ripOver
				? 'Ripple too high: a diode or winding of the alternator may be failing.'
				: lines.some((l) => l.verdict === 'high')
					? 'Charging too high: the regulator lets the voltage rise over the limit.'
					: 'Charging too low: check the belt, the alternator’s feed and earth drop, then the alternator.';
	return { verdict, summary, lines, working };
}

function judgeRelay(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	const coil = num(i, 'coilOhm');
	if (coil != null) {
		const min = num(i, 'coilMin') ?? 76.5;
		const max = num(i, 'coilMax') ?? 93.5;
		lines.push({ label: 'Coil', verdict: band(coil, min, max), text: `${fmt(coil, 1)} Ω, ${fmt(min, 1)}–${fmt(max, 1)} Ω`, value: `${fmt(coil, 1)} Ω`, spec: `${fmt(min, 1)}–${fmt(max, 1)} Ω` });
	}
	if (str(i, 'clicks')) lines.push({ label: 'Clicks', verdict: i.clicks === 'yes' ? 'ok' : 'not_ok', text: i.clicks === 'yes' ? 'Yes' : 'No click', value: i.clicks === 'yes' ? 'clicks' : 'no click', spec: 'clicks when powered' });
	const contact = num(i, 'contactV');
	if (contact != null) {
		const max = num(i, 'contactMaxV') ?? 0.2;
		lines.push({ label: 'Contacts', verdict: band(contact, null, max), text: `${fmt(contact, 3)} V, at most ${fmt(max, 3)} V`, value: `${fmt(contact, 3)} V`, spec: `at most ${fmt(max, 3)} V` });
	}
	if (lines.length < 3) return { verdict: 'cant_tell', summary: 'Can’t tell — measure the coil, listen for the click and read the contacts under load.', lines, working };
	const verdict = worst(lines);
	return { verdict, summary: verdict === 'ok' ? 'Relay OK.' : `Relay faulty: ${lines.filter((l) => l.verdict !== 'ok').map((l) => l.label.toLowerCase()).join(', ')}. Replace it.`, lines, working };
}

function judgeSensor(i: CircuitInputs): CircuitResult {
	const lines: CircuitLine[] = [];
	const working: string[] = [];
	if (str(i, 'sensorType') === 'hall') {
		const supply = num(i, 'supplyV');
		const nominal = str(i, 'supplyNominal') === '12' ? 12 : 5;
		// A 5 V reference within ±0.5 V, a battery feed from 11 V up (common practice).
		if (supply != null) lines.push({ label: 'Supply', verdict: nominal === 5 ? band(supply, 4.5, 5.5) : band(supply, 11, null), text: `${fmt(supply)} V, should be ${nominal === 5 ? '4.50–5.50 V' : 'at least 11.00 V'} (common practice)`, value: `${fmt(supply)} V`, spec: nominal === 5 ? '4.50–5.50 V' : 'at least 11.00 V' });
		const earth = num(i, 'earthV');
		if (earth != null) lines.push({ label: 'Earth', verdict: band(earth, null, 0.1), text: `${fmt(earth)} V drop, at most 0.10 V (common practice, per connection)`, value: `${fmt(earth)} V`, spec: 'at most 0.10 V' });
		const low = num(i, 'lowV');
		const high = num(i, 'highV');
		if (low != null && high != null) {
			const highMin = nominal === 5 ? 3.8 : supply != null ? supply * 0.8 : 9.6;
			const ok = low < 2.0 && high > highMin;
			lines.push({ label: 'Signal switching', verdict: ok ? 'ok' : 'not_ok', text: `low ${fmt(low)} V, high ${fmt(high)} V (low under 2.00 V, high over ${fmt(highMin)} V)`, value: `low ${fmt(low)} V, high ${fmt(high)} V`, spec: `low under 2.00 V, high over ${fmt(highMin)} V` });
			working.push(HALL_SOURCE);
		}
		if (lines.length < 3) return { verdict: 'cant_tell', summary: 'Can’t tell — read the supply, the earth and the signal.', lines, working };
	} else {
		const ohms = num(i, 'ohms');
		const ohmMin = num(i, 'ohmMin');
		const ohmMax = num(i, 'ohmMax');
		if (ohms != null && (ohmMin != null || ohmMax != null)) lines.push({ label: 'Winding', verdict: band(ohms, ohmMin, ohmMax), text: `${fmt(ohms, 0)} Ω, ${ohmMin != null ? fmt(ohmMin, 0) : '…'}–${ohmMax != null ? fmt(ohmMax, 0) : '…'} Ω (the sheet)`, value: `${fmt(ohms, 0)} Ω`, spec: ohmMin != null && ohmMax != null ? `${fmt(ohmMin, 0)}–${fmt(ohmMax, 0)} Ω` : ohmMin != null ? `at least ${fmt(ohmMin, 0)} Ω` : `at most ${fmt(ohmMax!, 0)} Ω` });
		const ac = num(i, 'acV');
		const acMin = num(i, 'acMinV');
		if (ac != null && acMin != null) lines.push({ label: 'AC output cranking', verdict: band(ac, acMin, null), text: `${fmt(ac)} V AC, at least ${fmt(acMin)} V (the sheet)`, value: `${fmt(ac)} V AC`, spec: `at least ${fmt(acMin)} V AC` });
		if (lines.length < 2) return { verdict: 'cant_tell', summary: 'Can’t tell — the resistance and the AC output both need the sheet’s figures.', lines, working };
	}
	const verdict = worst(lines);
	const which = str(i, 'which') === 'cam' ? 'Cam' : 'Crank';
	return { verdict, summary: verdict === 'ok' ? `${which} sensor OK.` : `${which} sensor: ${lines.filter((l) => l.verdict !== 'ok').map((l) => l.label.toLowerCase()).join(', ')} out of spec.`, lines, working };
}

const JUDGES: Record<CircuitKind, (i: CircuitInputs) => CircuitResult> = {
	battery: judgeBattery,
	parasitic: judgeParasitic,
	drop: judgeDrop,
	charging: judgeCharging,
	relay: judgeRelay,
	sensor: judgeSensor
};

/**
 * The one judge of a circuit test, on the phone and on the server. A figure outside its
 * field's range (which the phone never sends, but a record may carry) is "can't tell", so
 * nothing is judged on it.
 */
export function judgeCircuit(kind: CircuitKind, inputs: CircuitInputs): CircuitResult {
	for (const s of KINDS[kind].steps)
		for (const f of s.fields) {
			const v = inputs[f.key];
			if (f.type === 'number' && typeof v === 'number' && !(v >= f.min && v <= f.max))
				return { verdict: 'cant_tell', summary: `Can’t tell — ${f.label.toLowerCase()} must be between ${f.min} and ${f.max} ${f.unit}.`, lines: [], working: [] };
			if (f.type === 'choice' && v != null && !f.options.some((o) => o.value === v))
				return { verdict: 'cant_tell', summary: `Can’t tell — choose ${f.label.toLowerCase()}.`, lines: [], working: [] };
		}
	return JUDGES[kind](inputs);
}

/** The steps shown for these inputs (a step with `when` only when its choice matches). */
export function stepsFor(kind: CircuitKind, inputs: CircuitInputs): Step[] {
	return KINDS[kind].steps.filter((s) => !s.when || (inputs[s.when.key] ?? defaultOf(kind, s.when.key)) === s.when.value);
}

/** A field's default value, or undefined. */
export function defaultOf(kind: CircuitKind, key: string): number | string | undefined {
	for (const s of KINDS[kind].steps) for (const f of s.fields) if (f.key === key && 'default' in f) return f.default;
	return undefined;
}

/** Every default of a kind, as the inputs a new test starts with. */
export function defaultsFor(kind: CircuitKind): CircuitInputs {
	const out: CircuitInputs = {};
	for (const s of KINDS[kind].steps) for (const f of s.fields) if ('default' in f && f.default !== undefined) out[f.key] = f.default;
	return out;
}

/**
 * The parasitic wait: minutes left of `waitMin` since `startedAt` (ISO), never below 0. The
 * start time is stored, so a locked screen or a reload picks the countdown up where it is.
 */
export function minutesLeft(startedAt: string | null | undefined, waitMin: number, now: number): number | null {
	if (!startedAt) return null;
	const start = Date.parse(startedAt);
	if (!Number.isFinite(start)) return null;
	return Math.max(0, waitMin - (now - start) / 60000);
}

/** Whether two results say the same (the server keeps both and flags a difference). */
export const sameCircuitResult = (a: { verdict: string } | null | undefined, b: CircuitResult) => a != null && a.verdict === b.verdict;

/** What the screen holds per field: typed text for figures, the choice, a tick, fuse rows. */
export type Typed = Record<string, string | boolean | { fuse: string; mv: string }[] | undefined>;

/** The screen's starting values: the defaults as text. */
export function typedDefaults(kind: CircuitKind): Typed {
	const out: Typed = {};
	for (const s of KINDS[kind].steps)
		for (const f of s.fields) {
			if (f.type === 'number') out[f.key] = f.default != null ? String(f.default) : '';
			else if (f.type === 'choice') out[f.key] = f.default ?? '';
			else if (f.type === 'confirm') out[f.key] = false;
			else if (f.type === 'fuses') out[f.key] = [];
		}
	return out;
}

/**
 * The typed values as the test's inputs, for the steps shown: figures parsed (comma or point)
 * and checked against the field's range, each problem in words under its field. Empty figures
 * are left out (the result then says what is missing); fuse rows with no name and no figure
 * are dropped.
 */
export function inputsFromTyped(kind: CircuitKind, typed: Typed): { inputs: CircuitInputs; errors: Record<string, string> } {
	const inputs: CircuitInputs = {};
	const errors: Record<string, string> = {};
	const choices: CircuitInputs = {};
	for (const s of KINDS[kind].steps) for (const f of s.fields) if (f.type === 'choice') choices[f.key] = (typed[f.key] as string) || f.default || null;
	for (const s of stepsFor(kind, choices))
		for (const f of s.fields) {
			const t = typed[f.key];
			if (f.type === 'number') {
				const text = typeof t === 'string' ? t.trim() : '';
				if (!text) continue;
				const v = parseDecimal(text);
				if (v == null) errors[f.key] = `Type ${f.label.toLowerCase()} as a number, e.g. 12,4`;
				else if (v < f.min || v > f.max) errors[f.key] = `${f.label} is between ${f.min} and ${f.max} ${f.unit}`;
				else inputs[f.key] = v;
			} else if (f.type === 'choice') inputs[f.key] = choices[f.key];
			else if (f.type === 'confirm') inputs[f.key] = t === true;
			else if (f.type === 'fuses') {
				const rows: FuseReading[] = [];
				for (const [n, r] of (Array.isArray(t) ? t : []).entries()) {
					if (!r.fuse.trim() && !r.mv.trim()) continue;
					const mv = parseDecimal(r.mv);
					if (!r.fuse.trim()) errors[`fuse${n}`] = 'Name the fuse, e.g. F12';
					else if (mv == null || mv < 0 || mv > 20000) errors[`fuse${n}`] = 'Type the millivolts as a number, e.g. 0,4';
					else rows.push({ fuse: r.fuse.trim().slice(0, 30), mv });
				}
				inputs[f.key] = rows;
			}
		}
	return { inputs, errors };
}

/** A sheet's check as the limits need it: its key and bands (base units: Ω, V, A). */
export type SheetLimitCheck = { key: string; bands: { fromC: number | null; toC: number | null; min: number | null; max: number | null }[] };

/**
 * The limits a part's sheet gives this kind's fields: for each field naming a sheet check, the
 * first band's min or max (the band for every temperature when there is one). Figures the
 * sheet lacks keep their usual value.
 */
export function sheetLimits(kind: CircuitKind, checks: readonly SheetLimitCheck[]): Record<string, number> {
	const out: Record<string, number> = {};
	for (const s of KINDS[kind].steps)
		for (const f of s.fields) {
			if (f.type !== 'number' || !f.sheet) continue;
			const check = checks.find((c) => c.key === f.sheet!.check);
			const band = check?.bands.find((b) => b.fromC == null && b.toC == null) ?? check?.bands[0];
			const v = band?.[f.sheet.take];
			if (typeof v === 'number' && Number.isFinite(v)) out[f.key] = v;
		}
	return out;
}
