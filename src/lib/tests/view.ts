/**
 * A job's tests as a person reads them, built from the records both sides hold (the server's
 * rows, or the phone's IndexedDB copy — the same shapes the change feed carries): each test's
 * part, sheet version, meter and range, lead zero, temperature and the spec it chose, every
 * reading with its samples, the phone's result beside the workshop's (flagged where they
 * differ), the comparison between cylinders, and the job's spark and swap tests. Pure and
 * isomorphic: the office page and the phone page draw the same view.
 */
import { comparePositions, resultKey } from '../flow/decisions';
import { bandsFor, type CheckSpec, type Sample, type TemperatureSnapshot } from '../flow/reading';
import { formatQuantity, toBase, type Quantity } from '../domain/units';
import { bandName } from '../library/labels';
import { limitFromBase, plainNumber } from '../library/limits';
import { ROLE_LABELS } from '../labels';
import type { Role } from '../roles';
import { signOffStates, type FactDecision } from './facts';
import {
	MODE_TEXT,
	SIGNOFF_TEXT,
	type Decision,
	type SignOffKind,
	type SignOffState
} from './signoff';

type Rec = Record<string, unknown>;
export type SheetChecks = {
	id: string;
	sheetVersion: number;
	checks: (CheckSpec & { label: string; from?: string | null; to?: string | null })[];
};
export type People = Map<string, { name: string; role: Role }>;
export type ResultKey = ReturnType<typeof resultKey>;

/** One result: its word key (for the badge), its value in base units and as text. */
export type ResultView = { key: ResultKey; value: number | null; text: string };
export type ReadingView = {
	id: string;
	position: string | null;
	rangeLabel: string | null;
	/** The range could not tell a reading from the spec's limits (null: not known). */
	rangeUnresolved: boolean | null;
	samples: string[];
	phone: ResultView | null;
	/** The workshop's recomputed result; null until the reading reached the workshop. */
	workshop: ResultView | null;
	/** The workshop judged it differently from the phone. */
	differ: boolean;
	at: string | null;
};
export type CheckView = {
	key: string;
	label: string;
	terminals: string | null;
	unit: string | null;
	quantity: Quantity;
	/** The bands judged against at the test's temperature, with their limits. */
	specs: string[];
	readings: ReadingView[];
	/** The latest value per cylinder, for the comparison (the workshop's result when there is one). */
	byPosition: Record<string, { value: number; verdict: ResultKey }>;
	comparison: ReturnType<typeof comparePositions>;
};
/** Where a test stands with its sign-off, as people read it. */
export type SignOffView = {
	kind: SignOffKind;
	/** The badge's words ('' when no sign-off is needed). */
	text: string;
	/** Who decided and how, e.g. "Dana Reyes (Lead) · read at the desk". */
	by: string | null;
	at: string | null;
	/** The note with the decision: what to do again, for a test sent back. */
	note: string | null;
	/** A test waiting again: it was sent back before, with this note. */
	earlierNote: string | null;
};
export type TestView = {
	id: string;
	partNumber: string | null;
	/** Whether an apprentice did it (it then waits for a lead's sign-off). */
	needsSignOff: boolean;
	signOff: SignOffView;
	/** The first test this one re-tests after the repair (null: a first test). */
	retestOf: string | null;
	/** The first test's start, for "Re-test of the test of …" (null when not on this side). */
	retestOfAt: string | null;
	/** Re-tests started from this test, newest last. */
	retests: string[];
	sheetVersion: number | null;
	state: 'in_progress' | 'done' | 'abandoned';
	stateText: string;
	technician: string;
	startedAt: string | null;
	positions: string[];
	meter: { name: string; leads: string; ranges: string[] } | null;
	temperature: string;
	/** The spec(s) the test was judged against, e.g. "Cold spec · below 50 °C". */
	specsChosen: string[];
	checks: CheckView[];
	readingCount: number;
	mismatches: number;
	notes: string | null;
};
export type SparkView = {
	id: string;
	position: string;
	gap: string;
	outcome: 'go' | 'weak' | 'none';
	outcomeText: string;
	note: string | null;
	by: string;
	at: string | null;
};
export type SwapView = {
	id: string;
	from: string;
	to: string;
	before: string;
	after: string;
	conclusion: string;
	note: string | null;
	by: string;
	at: string | null;
};
export type JobTestsView = { tests: TestView[]; sparks: SparkView[]; swaps: SwapView[] };

export const TEST_STATE_TEXT = {
	in_progress: 'In progress',
	done: 'Finished',
	abandoned: 'Abandoned'
} as const;
export const SPARK_TEXT = { go: 'Sparks', weak: 'Weak spark', none: 'No spark' } as const;
export const SWAP_TEXT = {
	fault_followed: 'The misfire followed the coil: the coil is the likely cause',
	fault_stayed: 'The misfire stayed: look at the plug, injector or wiring',
	inconclusive: 'Inconclusive: the misfire went away or moved elsewhere'
} as const;
const TEMP_TEXT = {
	overnight: 'Stood overnight (about 20 °C)',
	warm: 'Warm, not measured',
	just_run: 'Just run (about 80 °C)',
	unknown: 'Not known'
} as const;

const quantityOf = (q: string): Quantity =>
	q === 'voltage' || q === 'voltage_drop' ? 'voltage' : q === 'current' ? 'current' : 'resistance';
const str = (v: unknown) => (typeof v === 'string' && v !== '' ? v : null);
const iso = (v: unknown) => (v == null ? null : new Date(v as string).toISOString());

export type BuildInput = {
	tests: Rec[];
	readings: Rec[];
	/**
	 * Sign-off decisions. A record's `order` (here and on readings) is its place in the feed;
	 * without one, its arrival time (`createdAt`).
	 */
	signoffs?: Rec[];
	sparks: Rec[];
	swaps: Rec[];
	sheets: SheetChecks[];
	people: People;
	/** BCP 47 locale for decimal commas or points. */
	locale: string;
};

/** A person's name and role as the workshop knows them. */
function personOf(people: People, id: unknown, fallback = 'Someone not on this phone') {
	const p = typeof id === 'string' ? people.get(id) : undefined;
	return p ? `${p.name} (${ROLE_LABELS[p.role]})` : fallback;
}

function resultOf(
	r: unknown,
	quantity: Quantity,
	openOk: boolean,
	locale: string
): ResultView | null {
	if (!r || typeof r !== 'object') return null;
	const x = r as { value?: number | null; verdict?: string; ol?: boolean };
	const value = x.ol ? Infinity : (x.value ?? null);
	const key = resultKey((x.verdict ?? 'no_spec') as never, value, openOk);
	return {
		key,
		value: value === Infinity ? null : value,
		text:
			value == null ? '—' : value === Infinity ? 'OL' : formatQuantity(value, quantity, { locale })
	};
}

function limitsText(
	b: { min: number | null; max: number | null },
	unit: string | null,
	locale: string
) {
	const comma = (1.5).toLocaleString(locale).includes(',');
	const n = (v: number) => `${plainNumber(limitFromBase(v, unit), comma)} ${unit ?? ''}`.trim();
	if (b.min != null && b.max != null) return `${n(b.min)} to ${n(b.max)}`;
	if (b.min != null) return `at least ${n(b.min)}`;
	if (b.max != null) return `at most ${n(b.max)}`;
	return 'no limits';
}

function sampleText(s: Sample, quantity: Quantity, locale: string) {
	return s.value === 'OL'
		? 'OL'
		: formatQuantity(toBase(s.value, s.unit), quantity, { locale, digits: 4 });
}

function temperatureText(t: TemperatureSnapshot | null) {
	if (!t) return 'Not recorded';
	return t.mode === 'measured' ? `Measured ${t.tempC} °C` : TEMP_TEXT[t.mode];
}

function meterOf(m: Rec | null, locale: string): TestView['meter'] {
	if (!m) return null;
	const lead = Number(m.leadResistance ?? 0);
	const leads = m.relativeMode
		? 'Relative mode: the meter takes the leads off'
		: lead > 0
			? `Lead zero ${formatQuantity(lead, 'resistance', { locale })}, taken off each reading`
			: 'Leads not zeroed';
	const ranges = ((m.ranges as { label: string }[] | undefined) ?? []).map((r) => r.label);
	return { name: str(m.name) ?? 'Meter', leads, ranges };
}

function checkView(
	check: SheetChecks['checks'][number],
	readings: Rec[],
	temp: TemperatureSnapshot,
	locale: string
): CheckView {
	const quantity = quantityOf(check.quantity);
	const views: ReadingView[] = readings.map((r) => {
		const workshop = resultOf(r.serverResult, quantity, check.openOk, locale);
		return {
			id: String(r.id),
			position: str(r.position),
			rangeLabel: str(r.rangeLabel),
			rangeUnresolved: typeof r.rangeUnresolved === 'boolean' ? r.rangeUnresolved : null,
			samples: ((r.samples as Sample[]) ?? []).map((s) => sampleText(s, quantity, locale)),
			phone: resultOf(r.deviceResult, quantity, check.openOk, locale),
			workshop,
			differ: Boolean(r.mismatch),
			at: iso(r.deviceTime ?? r.createdAt)
		};
	});
	const byPosition: CheckView['byPosition'] = {};
	for (const v of views) {
		const res = v.workshop ?? v.phone;
		const value = res?.text === 'OL' ? Infinity : res?.value;
		if (res && value != null) byPosition[v.position ?? '1'] = { value, verdict: res.key };
	}
	const finite = Object.fromEntries(
		Object.entries(byPosition)
			.filter(([, x]) => Number.isFinite(x.value))
			.map(([k, x]) => [k, x.value])
	);
	return {
		key: check.key,
		label: check.label,
		terminals:
			check.from || check.to ? `between ${check.from ?? '?'} and ${check.to ?? '?'}` : null,
		unit: check.unit ?? null,
		quantity,
		specs: bandsFor(check.bands, temp).map(
			(b) => `${bandName(b)}: ${limitsText(b, check.unit, locale)}`
		),
		readings: views,
		byPosition,
		comparison: comparePositions(finite)
	};
}

/** A record's place in the feed: `order` when given, else its arrival time. */
const orderOf = (r: Rec) =>
	typeof r.order === 'number' ? r.order : Date.parse(String(r.createdAt ?? r.deviceTime ?? 0)) || 0;

/** Each test's sign-off as people read it. */
function signOffViews(input: BuildInput): Map<string, SignOffView> {
	const tests = input.tests.map((t) => ({
		id: String(t.id),
		partNumber: str(t.partNumber),
		position: str(t.position),
		state: String(t.state ?? 'in_progress'),
		needsSignOff: Boolean(t.needsSignOff),
		retestOf: str(t.retestOf)
	}));
	const readings = input.readings.map((r) => ({
		testId: String(r.testId),
		checkKey: String(r.checkKey),
		position: str(r.position),
		verdict: null,
		order: orderOf(r)
	}));
	const decisions: FactDecision[] = (input.signoffs ?? []).map((d) => ({
		testId: String(d.testId),
		decision: d.decision === 'sent_back' ? 'sent_back' : 'signed',
		mode: d.mode === 'witnessed' ? 'witnessed' : 'remote',
		note: str(d.note),
		by: str(d.createdBy),
		at: iso(d.createdAt ?? d.deviceTime),
		order: orderOf(d)
	}));
	return new Map(
		[...signOffStates(tests, readings, decisions)].map(([id, s]) => [
			id,
			signOffViewOf(s, input.people)
		])
	);
}

/** A sign-off state as the badge and its detail show it (a coil test's or a circuit test's). */
export function signOffViewOf(s: SignOffState, people: People): SignOffView {
	const who = (d: Decision) => personOf(people, d.by);
	const view: SignOffView = {
		kind: s.kind,
		text: SIGNOFF_TEXT[s.kind],
		by: null,
		at: null,
		note: null,
		earlierNote: null
	};
	if (s.kind === 'signed')
		Object.assign(view, {
			by: `${who(s.last)} · ${MODE_TEXT[s.last.mode]}`,
			at: s.last.at,
			note: s.last.note
		});
	else if (s.kind === 'sent_back')
		Object.assign(view, { by: who(s.last), at: s.last.at, note: s.last.note });
	else if (s.kind === 'waiting' || s.kind === 'in_progress')
		view.earlierNote = s.sentBack?.note ?? null;
	return view;
}

function testView(
	t: Rec,
	readings: Rec[],
	sheets: Map<string, SheetChecks>,
	people: People,
	locale: string,
	signOff: SignOffView
): TestView {
	const temp = (t.temperature as TemperatureSnapshot | null) ?? null;
	const judgedAt: TemperatureSnapshot = temp ?? { mode: 'unknown' };
	const sheet = typeof t.sheetId === 'string' ? sheets.get(t.sheetId) : undefined;
	const mine = readings
		.filter((r) => r.testId === t.id)
		.sort((a, b) =>
			String(a.createdAt ?? a.deviceTime ?? '').localeCompare(
				String(b.createdAt ?? b.deviceTime ?? '')
			)
		);
	const known = new Set(sheet?.checks.map((c) => c.key));
	const checks = (sheet?.checks ?? [])
		.filter((c) => c.quantity !== 'visual' && c.quantity !== 'spark')
		.map((c) =>
			checkView(
				c,
				mine.filter((r) => r.checkKey === c.key),
				judgedAt,
				locale
			)
		);
	// Readings of a check this phone does not know (its sheet not synced yet) are still listed.
	const loose = mine.filter((r) => !known.has(String(r.checkKey)));
	if (loose.length) {
		const keys = [...new Set(loose.map((r) => String(r.checkKey)))];
		for (const key of keys) {
			const stub = {
				key,
				label: key,
				quantity: 'resistance',
				unit: 'Ω',
				openOk: false,
				bands: []
			} as SheetChecks['checks'][number];
			checks.push(
				checkView(
					stub,
					loose.filter((r) => r.checkKey === key),
					judgedAt,
					locale
				)
			);
		}
	}
	const first = sheet?.checks.find((c) => c.bands.length > 0);
	const state = (t.state as TestView['state']) ?? 'in_progress';
	return {
		id: String(t.id),
		partNumber: str(t.partNumber),
		needsSignOff: Boolean(t.needsSignOff),
		signOff,
		retestOf: str(t.retestOf),
		retestOfAt: null,
		retests: [],
		sheetVersion: (t.sheetVersion as number | null) ?? sheet?.sheetVersion ?? null,
		state,
		stateText: TEST_STATE_TEXT[state],
		technician: personOf(people, t.technicianId),
		startedAt: iso(t.createdAt),
		positions: String(t.position ?? '')
			.split(',')
			.map((p) => p.trim())
			.filter(Boolean),
		meter: meterOf((t.meter as Rec | null) ?? null, locale),
		temperature: temperatureText(temp),
		specsChosen: first ? bandsFor(first.bands, judgedAt).map((b) => bandName(b)) : [],
		checks,
		readingCount: mine.length,
		mismatches: mine.filter((r) => r.mismatch).length,
		notes: str(t.notes)
	};
}

/** The job's tests (oldest first), spark tests and swap tests, ready to draw. */
export function buildJobTests(input: BuildInput): JobTestsView {
	const { people, locale } = input;
	const sheets = new Map(input.sheets.map((s) => [s.id, s]));
	const byTime = (a: Rec, b: Rec) =>
		String(a.createdAt ?? a.deviceTime ?? '').localeCompare(
			String(b.createdAt ?? b.deviceTime ?? '')
		);
	const comma = (1.5).toLocaleString(locale).includes(',');
	const counts = (c: unknown) =>
		Object.entries((c as Record<string, number>) ?? {})
			.map(([p, n]) => `cyl ${p}: ${n}`)
			.join(', ') || 'none';
	const signOffs = signOffViews(input);
	const tests = [...input.tests]
		.sort(byTime)
		.map((t) => testView(t, input.readings, sheets, people, locale, signOffs.get(String(t.id))!));
	for (const t of tests) {
		const first = t.retestOf ? tests.find((x) => x.id === t.retestOf) : undefined;
		if (first) {
			t.retestOfAt = first.startedAt;
			first.retests.push(t.id);
		}
	}
	return {
		tests,
		sparks: [...input.sparks].sort(byTime).map((s) => ({
			id: String(s.id),
			position: String(s.position),
			gap: `${plainNumber(Number(s.gapMm), comma)} mm`,
			outcome: s.outcome as SparkView['outcome'],
			outcomeText: SPARK_TEXT[s.outcome as SparkView['outcome']] ?? String(s.outcome),
			note: str(s.note),
			by: personOf(people, s.createdBy),
			at: iso(s.deviceTime ?? s.createdAt)
		})),
		swaps: [...input.swaps].sort(byTime).map((s) => ({
			id: String(s.id),
			from: String(s.fromPosition),
			to: String(s.toPosition),
			before: counts(s.beforeCounts),
			after: counts(s.afterCounts),
			conclusion: SWAP_TEXT[s.conclusion as keyof typeof SWAP_TEXT] ?? String(s.conclusion),
			note: str(s.note),
			by: personOf(people, s.createdBy),
			at: iso(s.deviceTime ?? s.createdAt)
		}))
	};
}
