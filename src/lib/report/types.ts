/**
 * The customer's report in two shapes: the facts gathered from a job (`ReportFacts`, values
 * in SI base units, as stored) and the report itself in the customer's words (`ReportDoc`),
 * made from the facts by `buildReport` (words.ts). The page and the PDF both draw a
 * `ReportDoc`, so they say the same thing; a sent report keeps its `ReportDoc` frozen.
 */
import type { SpecBand } from '../domain/spec';
import type { TemperatureSnapshot } from '../flow/reading';
import type { CircuitKind, CircuitLine, CircuitVerdict } from '../flow/circuit';

export type Paper = 'a4' | 'letter';
export const PAPERS: readonly Paper[] = ['a4', 'letter'];
export const PAPER_LABELS: Record<Paper, string> = { a4: 'A4', letter: 'US Letter' };

export type RecommendationGrade = 'urgent' | 'advised' | 'monitor';
export const RECOMMENDATION_GRADES: readonly RecommendationGrade[] = ['urgent', 'advised', 'monitor'];

/**
 * A photo marked for the customer. The photo store fills these; until it exists the list is
 * empty and nothing is drawn. `src` is the address the report page loads it from; the PDF
 * asks the server for its bytes by `id`.
 */
export type ReportPhoto = { id: string; caption: string; src: string; width?: number; height?: number };

/** One check of a spec sheet, as the report needs it (limits in base units). */
export type CheckFacts = {
	key: string;
	label: string;
	quantity: string;
	unit: string | null;
	openOk: boolean;
	bands: SpecBand[];
};

/** The server's result of one reading (see `ReadingResult` in flow/reading.ts). */
export type ReadingFacts = {
	position: string | null;
	checkKey: string;
	/** Settled value in base units; null when none; Infinity for an open circuit (OL). */
	value: number | null;
	verdict: 'within' | 'borderline' | 'low' | 'high' | 'depends' | 'no_spec' | 'bad_zero' | 'over_range' | 'not_ok';
	/** The bands it was judged against, with each band's verdict and margin. */
	bands: { fromC: number | null; toC: number | null; verdict: string; marginPct: number | null; nearest: 'min' | 'max' | null }[];
};

export type ComponentKindName =
	| 'ignition_coil'
	| 'coil_pack'
	| 'injector'
	| 'crank_cam_sensor'
	| 'relay'
	| 'glow_plug'
	| 'heater_element'
	| 'battery'
	| 'alternator'
	| 'other';

export type TestFacts = {
	partNumber: string | null;
	kind: ComponentKindName | null;
	/** The positions tested, in order; for a coil pack, the cylinders each coil serves. */
	positions: { position: string; cylinders: number[] | null }[];
	temperature: TemperatureSnapshot | null;
	checks: CheckFacts[];
	/** The latest reading of each check at each position. */
	readings: ReadingFacts[];
};

/**
 * A circuit test (battery, parasitic draw, voltage drop, charging, relay, crank or cam sensor)
 * as the workshop judged it (`circuit_tests.server_result`), with the few figures typed that
 * say what was tested.
 */
export type CircuitFacts = {
	kind: CircuitKind;
	partNumber: string | null;
	verdict: CircuitVerdict;
	/** One line per thing judged, with the value and the limit it was judged against. */
	lines: CircuitLine[];
	/** Parasitic draw: days until a charged battery is too flat to start the engine. */
	days: number | null;
	/** Voltage drop: the side that lost too much. */
	side: 'feed' | 'earth' | null;
	/** Voltage drop: the circuit (`starter`, `coil`, `charging`, `other`). */
	circuit: string | null;
	/** Sensor: crank or cam. */
	which: 'crank' | 'cam' | null;
};

export type FaultCodeFacts = { code: string; text: string };

export type ReportFacts = {
	jobNumber: number;
	complaint: string;
	codesBefore: FaultCodeFacts[];
	codesAfter: FaultCodeFacts[];
	customerName: string | null;
	vehicle: {
		make: string;
		model: string;
		year: number | null;
		plate: string | null;
		vin: string | null;
		odometer: number | null;
		odometerUnit: 'km' | 'mi';
	} | null;
	workshop: { name: string; address: string | null; phone: string | null; email: string | null };
	/** Who did the tests (names), in the order they first tested. */
	technicians: string[];
	tests: TestFacts[];
	sparks: { position: string; gapMm: number; outcome: 'go' | 'weak' | 'none' }[];
	swaps: { fromPosition: string; toPosition: string; conclusion: 'fault_followed' | 'fault_stayed' | 'inconclusive' }[];
	/** Circuit tests in feed order (none in facts gathered before they existed). */
	circuits?: CircuitFacts[];
	workDone: string | null;
	recommendations: { grade: RecommendationGrade; text: string }[];
	photos: ReportPhoto[];
	/** The day of the report, `YYYY-MM-DD`, in the workshop's time zone. */
	date: string;
	/** The workshop's IANA time zone: the report's dates and times are its local time (UTC when absent). */
	timeZone?: string;
};

/** A finding's outcome in three words a customer reads: OK, out of spec, can't tell. */
export type Outcome = 'ok' | 'out' | 'unclear';

/**
 * One figure of a finding. `specLabel` names what `spec` is: the maker's figure by default; a
 * circuit test's limit may be the vehicle's sheet or common practice, so it says "Judged
 * against". An empty `spec` is not printed.
 */
export type Figure = { label: string; value: string; spec: string; result: string; specLabel?: string };

export type Finding = {
	outcome: Outcome;
	/** "OK", "Out of spec" or "Can't tell". */
	outcomeText: string;
	/** What it is about: "Ignition coil TB-IC-2041, cylinder 3". */
	title: string;
	/** One plain sentence. */
	sentence: string;
	figures: Figure[];
};

/** The report in the customer's words: everything the page and the PDF print. */
export type ReportDoc = {
	format: 1;
	title: string;
	jobNumber: number;
	date: string;
	dateText: string;
	/** "Dates and times are Europe/London time, where the workshop is." (absent on reports sent before zones). */
	timeNote?: string;
	workshop: { name: string; lines: string[] };
	customerName: string | null;
	vehicle: { heading: string; lines: string[] } | null;
	reported: string;
	summary: string;
	counts: Record<Outcome, number>;
	tested: { heading: string; lines: string[] }[];
	findings: Finding[];
	codes: { heading: string; lines: string[] }[];
	workDone: string | null;
	recommendations: { grade: RecommendationGrade; gradeText: string; text: string }[];
	photos: ReportPhoto[];
	technicians: string;
	closing: string;
};

/** A report sent on a job, as the job's history shows it. */
export type SentReport = {
	id: string;
	channel: 'email' | 'link';
	recipient: string | null;
	paper: Paper;
	createdAt: Date;
	by: string;
	expiresAt: Date;
	withdrawnAt: Date | null;
	withdrawnBy: string | null;
	pdfBytes: number;
	mail: { state: 'queued' | 'sending' | 'sent' | 'failed'; attempts: number; lastReply: string | null; sentAt: Date | null; nextAttemptAt: Date | null } | null;
	/** Every attempt at sending its e-mail, oldest first. */
	attempts: { attempt: number; outcome: string; reply: string | null; at: Date }[];
};

