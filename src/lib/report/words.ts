/**
 * The customer's report in plain words, built from the job's facts: the one source of the
 * wording for the report page, the PDF and the e-mail. Pure; no I/O.
 *
 * Each tested position of a part is one finding: its outcome (OK, out of spec, can't tell)
 * is the worst of its checks, said in one plain sentence, with the figures beneath it (value
 * with its unit, the maker's figure with its temperature, and the result in words). Each
 * circuit test (battery, charging, …) is one finding too (`circuit-words.ts`).
 */
import { zoneWords } from '../zoned-time';
import { normalizeUnit } from '../domain/units';
import { specText, valueText } from './figures';
import { circuitFinding, circuitTested } from './circuit-words';
import type {
	CheckFacts,
	ComponentKindName,
	Figure,
	Finding,
	Outcome,
	ReadingFacts,
	RecommendationGrade,
	ReportDoc,
	ReportFacts,
	TestFacts
} from './types';

export const OUTCOME_TEXT: Record<Outcome, string> = {
	ok: 'OK',
	out: 'Out of spec',
	unclear: 'Can’t tell'
};

export const GRADE_TEXT: Record<RecommendationGrade, string> = {
	urgent: 'Needs doing now',
	advised: 'Advised soon',
	monitor: 'Keep an eye on it'
};

/** The closing note every report carries. */
export const CLOSING_NOTE =
	'This report describes what we tested and found on the day. Any advice in it depends on the vehicle maker’s procedure and on local regulations, which come first. If anything is unclear, please ask us.';

const KIND_NAME: Record<ComponentKindName, string> = {
	ignition_coil: 'Ignition coil',
	coil_pack: 'Coil pack',
	injector: 'Injector',
	crank_cam_sensor: 'Crank or cam sensor',
	relay: 'Relay',
	glow_plug: 'Glow plug',
	heater_element: 'Heater element',
	battery: 'Battery',
	alternator: 'Alternator',
	other: 'Part'
};
/** What the customer calls one of it in a sentence. */
const KIND_NOUN: Record<ComponentKindName, string> = {
	ignition_coil: 'coil',
	coil_pack: 'coil',
	injector: 'injector',
	crank_cam_sensor: 'sensor',
	relay: 'relay',
	glow_plug: 'glow plug',
	heater_element: 'heater element',
	battery: 'battery',
	alternator: 'alternator',
	other: 'part'
};

/** The result of one reading in the product's words (DESIGN §7). */
const RESULT_WORD: Record<ReadingFacts['verdict'], string> = {
	within: 'OK',
	low: 'under spec',
	high: 'over spec',
	borderline: 'can’t tell — re-check on a lower range',
	depends: 'can’t tell — depends on the temperature',
	no_spec: 'no maker’s figure',
	bad_zero: 'can’t tell — re-zero the leads',
	over_range: 'can’t tell — over range',
	not_ok: 'not OK (visual check)'
};

const outcomeOf = (r: ReadingFacts): Outcome =>
	r.verdict === 'within' ? 'ok' : r.verdict === 'low' || r.verdict === 'high' || r.verdict === 'not_ok' ? 'out' : 'unclear';
const RANK: Record<Outcome, number> = { ok: 0, unclear: 1, out: 2 };

const list = (items: string[]) =>
	items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`;
const lower = (s: string) => (s ? s[0].toLowerCase() + s.slice(1) : s);
const isCylinder = (p: string) => /^\d{1,2}$/.test(p);

/** "cylinder 3", "the coil serving cylinders 1 and 4", "position B". */
function placeOf(p: { position: string; cylinders: number[] | null } | undefined): string | null {
	if (!p) return null;
	if (p.cylinders?.length)
		return p.cylinders.length === 1 ? `cylinder ${p.cylinders[0]}` : `cylinders ${list(p.cylinders.map(String))}`;
	return isCylinder(p.position) ? `cylinder ${p.position}` : `position ${p.position}`;
}

function partName(t: TestFacts): string {
	const kind = KIND_NAME[t.kind ?? 'other'];
	return t.partNumber ? `${kind} ${t.partNumber}` : kind;
}

/** The one plain sentence for a part at a place, from its worst reading. */
export function findingSentence(
	noun: string,
	place: string | null,
	worst: ReadingFacts,
	check: CheckFacts | undefined,
	manyChecks: boolean
): string {
	const subject = `The ${noun}${place ? (place.startsWith('cylinders') ? ` serving ${place}` : ` on ${place}`) : ''}`;
	const which = manyChecks && check ? ` (${lower(check.label)})` : '';
	const band = worst.bands.find((b) => b.verdict === worst.verdict) ?? worst.bands[0];
	const well = band?.marginPct != null && Math.abs(band.marginPct) >= 20 ? 'well ' : '';
	switch (worst.verdict) {
		case 'within':
			return `${subject} measured within the maker’s figures.`;
		case 'high':
			if (worst.value === Infinity)
				return `${subject} reads as an open circuit${which}: it is broken inside and should be replaced.`;
			return `${subject} measured ${well}above its limit${which}: it should be replaced.`;
		case 'low':
			return `${subject} measured ${well}below its limit${which}: it should be replaced.`;
		case 'borderline':
			return `${subject} measured too close to its limit to be sure${which}: it needs to be checked again.`;
		case 'not_ok':
			return `${subject} failed its visual check${which}: it should be replaced.`;
		case 'bad_zero':
			return `${subject} could not be judged${which}: the meter's leads need zeroing again, and it needs to be checked again.`;
		case 'over_range':
			return `${subject} read above the meter's range${which}: it needs to be checked again on a higher range.`;
		case 'depends':
			return `${subject} gave a reading whose result depends on the engine temperature${which}, which was not certain: it needs to be checked again at a known temperature.`;
		default:
			return `There is no maker’s figure on file to judge the ${noun}${place ? ` on ${place}` : ''} against${which}.`;
	}
}

function findingsOfTest(t: TestFacts): Finding[] {
	const noun = KIND_NOUN[t.kind ?? 'other'];
	const checks = t.checks.filter((c) => c.quantity !== 'visual' && c.quantity !== 'spark');
	const places = t.positions.length ? t.positions : [{ position: '', cylinders: null }];
	return places.flatMap((p) => {
		const readings = checks.flatMap((c) => {
			const r = t.readings.find((x) => x.checkKey === c.key && (x.position ?? '') === p.position)
				?? (places.length === 1 ? t.readings.find((x) => x.checkKey === c.key) : undefined);
			return r ? [{ r, c }] : [];
		});
		if (!readings.length) return [];
		const worst = readings.reduce((a, b) => (RANK[outcomeOf(b.r)] > RANK[outcomeOf(a.r)] ? b : a));
		const place = p.position ? placeOf(p) : null;
		const figures: Figure[] = readings.map(({ r, c }) => ({
			label: c.label,
			value: valueText(r.value, c.unit),
			spec: specText(c, r.bands),
			result: r.value === Infinity && r.verdict === 'high' ? 'open' : RESULT_WORD[r.verdict]
		}));
		const outcome = outcomeOf(worst.r);
		return [
			{
				outcome,
				outcomeText: OUTCOME_TEXT[outcome],
				title: place ? `${partName(t)}, ${place}` : partName(t),
				sentence: findingSentence(noun, place, worst.r, worst.c, readings.length > 1),
				figures
			}
		];
	});
}

const SPARK: Record<'go' | 'weak' | 'none', { outcome: Outcome; words: string }> = {
	go: { outcome: 'ok', words: 'gave a good, steady spark' },
	weak: { outcome: 'out', words: 'gave only a weak spark: it cannot fire the plug reliably and should be replaced' },
	none: { outcome: 'out', words: 'gave no spark: it should be replaced' }
};

function sparkFinding(s: ReportFacts['sparks'][number]): Finding {
	const w = SPARK[s.outcome];
	const place = isCylinder(s.position) ? `cylinder ${s.position}` : `position ${s.position}`;
	const gap = valueText(s.gapMm / 1000, 'mm');
	const [did, advice] = w.words.split(': ');
	return {
		outcome: w.outcome,
		outcomeText: OUTCOME_TEXT[w.outcome],
		title: `Spark test, ${place}`,
		sentence: `The coil on ${place} ${did} across a ${gap} tester gap${advice ? `: ${advice}` : ''}.`,
		figures: []
	};
}

function swapFinding(s: ReportFacts['swaps'][number]): Finding {
	const from = isCylinder(s.fromPosition) ? `cylinder ${s.fromPosition}` : `position ${s.fromPosition}`;
	const to = isCylinder(s.toPosition) ? `cylinder ${s.toPosition}` : `position ${s.toPosition}`;
	const map = {
		fault_followed: {
			outcome: 'out' as Outcome,
			sentence: `We moved the coil from ${from} to ${to} and the misfire moved with it: the coil is at fault.`
		},
		fault_stayed: {
			outcome: 'ok' as Outcome,
			sentence: `We moved the coil from ${from} to ${to} and the misfire stayed on ${from}: the coil is not the cause, so the plug, injector or wiring of ${from} come next.`
		},
		inconclusive: {
			outcome: 'unclear' as Outcome,
			sentence: `We moved the coil from ${from} to ${to}, but the result does not show the cause on its own: it needs more testing.`
		}
	}[s.conclusion];
	return {
		outcome: map.outcome,
		outcomeText: OUTCOME_TEXT[map.outcome],
		title: `Coil swap, ${from} to ${to}`,
		sentence: map.sentence,
		figures: []
	};
}

const TEMPERATURE_WORDS = {
	overnight: 'engine cold (stood overnight)',
	warm: 'engine warm',
	just_run: 'engine hot (just run)',
	unknown: 'engine temperature not known'
} as const;

function testedOf(t: TestFacts): { heading: string; lines: string[] } {
	const places = t.positions.map((p) => placeOf(p)).filter((p): p is string => p !== null);
	const cylinders = t.positions.every((p) => !p.cylinders?.length && isCylinder(p.position));
	const where = places.length
		? cylinders && places.length > 1
			? `Cylinders ${list(t.positions.map((p) => p.position))}`
			: list(places.map((p) => p[0].toUpperCase() + p.slice(1)))
		: null;
	const checks = t.checks.filter((c) => c.quantity !== 'visual' && c.quantity !== 'spark');
	const what = checks.length
		? `Checked: ${list(checks.map((c) => `${lower(c.label)} (${c.quantity === 'resistance' ? 'resistance' : lower(c.quantity.replace('_', ' '))}${c.unit ? `, in ${normalizeUnit(c.unit) ?? c.unit}` : ''})`))}`
		: null;
	const temp = t.temperature
		? t.temperature.mode === 'measured'
			? `Temperature: measured ${valueText(t.temperature.tempC, null)} °C`
			: `Temperature: ${TEMPERATURE_WORDS[t.temperature.mode]}`
		: null;
	return { heading: partName(t), lines: [where, what, temp].filter((x): x is string => x !== null) };
}

function vehicleOf(v: NonNullable<ReportFacts['vehicle']>) {
	return {
		heading: [`${v.make} ${v.model}`, v.year].filter(Boolean).join(', '),
		lines: [
			v.plate ? `Registration ${v.plate}` : null,
			v.vin ? `VIN ${v.vin}` : null,
			v.odometer != null ? `Odometer ${v.odometer} ${v.odometerUnit === 'mi' ? 'miles' : 'km'}` : null
		].filter((x): x is string => x !== null)
	};
}

function summaryOf(counts: Record<Outcome, number>): string {
	const total = counts.ok + counts.out + counts.unclear;
	if (total === 0) return 'No test results are recorded on this job yet.';
	const parts = [
		counts.out ? `${counts.out} ${counts.out === 1 ? 'finding is' : 'findings are'} out of spec` : null,
		counts.unclear ? `${counts.unclear} could not be told for sure` : null,
		counts.ok ? `${counts.ok} ${counts.ok === 1 ? 'is' : 'are'} OK` : null
	].filter((x): x is string => x !== null);
	return `We made ${total} ${total === 1 ? 'finding' : 'findings'}: ${list(parts)}.`;
}

/** "2 December 2026" for `YYYY-MM-DD`. */
export function dateText(day: string): string {
	return new Date(`${day}T12:00:00Z`).toLocaleDateString('en-GB', {
		day: 'numeric',
		month: 'long',
		year: 'numeric',
		timeZone: 'UTC'
	});
}

/** The line saying whose clock the report's dates and times follow. */
export const timeNoteOf = (zone: string) =>
	zone === 'UTC'
		? 'Dates and times in this report are in UTC.'
		: `Dates and times in this report are the workshop’s local time (${zoneWords(zone)}).`;

/** The report in the customer's words. */
export function buildReport(f: ReportFacts): ReportDoc {
	const findings = [
		...f.tests.flatMap(findingsOfTest),
		...f.sparks.map(sparkFinding),
		...f.swaps.map(swapFinding),
		...(f.circuits ?? []).map(circuitFinding)
	];
	const counts = { ok: 0, out: 0, unclear: 0 } as Record<Outcome, number>;
	for (const x of findings) counts[x.outcome]++;
	const tested = f.tests.map(testedOf);
	if (f.sparks.length) {
		const gaps = [...new Set(f.sparks.map((s) => valueText(s.gapMm / 1000, 'mm')))];
		const places = [...new Set(f.sparks.map((s) => s.position))];
		const where = places.every(isCylinder)
			? `${places.length === 1 ? 'Cylinder' : 'Cylinders'} ${list(places)}`
			: list(places.map((p) => `position ${p}`));
		tested.push({ heading: 'Spark test', lines: [where, `Tester gap: ${list(gaps)}`] });
	}
	if (f.swaps.length)
		tested.push({
			heading: 'Coil swap test',
			lines: f.swaps.map((s) => `Coil moved from ${isCylinder(s.fromPosition) ? 'cylinder ' : ''}${s.fromPosition} to ${isCylinder(s.toPosition) ? 'cylinder ' : ''}${s.toPosition}`)
		});
	for (const c of f.circuits ?? []) tested.push(circuitTested(c));
	const code = (c: { code: string; text: string }) => (c.text ? `${c.code}: ${c.text}` : c.code);
	const codes = [
		f.codesBefore.length ? { heading: 'Fault codes stored before the work', lines: f.codesBefore.map(code) } : null,
		f.codesAfter.length ? { heading: 'Fault codes stored after the work', lines: f.codesAfter.map(code) } : null
	].filter((x): x is { heading: string; lines: string[] } => x !== null);
	const w = f.workshop;
	return {
		format: 1,
		title: `Vehicle report, job ${f.jobNumber}`,
		jobNumber: f.jobNumber,
		date: f.date,
		dateText: dateText(f.date),
		timeNote: timeNoteOf(f.timeZone ?? 'UTC'),
		workshop: {
			name: w.name,
			lines: [w.address, w.phone ? `Phone ${w.phone}` : null, w.email ? `E-mail ${w.email}` : null].filter(
				(x): x is string => !!x
			)
		},
		customerName: f.customerName,
		vehicle: f.vehicle ? vehicleOf(f.vehicle) : null,
		reported: f.complaint,
		summary: summaryOf(counts),
		counts,
		tested,
		findings,
		codes,
		workDone: f.workDone?.trim() || null,
		recommendations: f.recommendations
			.filter((r) => r.text.trim())
			.map((r) => ({ grade: r.grade, gradeText: GRADE_TEXT[r.grade], text: r.text.trim() })),
		photos: f.photos,
		technicians: f.technicians.length ? list(f.technicians) : 'Not recorded',
		closing: CLOSING_NOTE
	};
}
