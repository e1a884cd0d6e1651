/**
 * A reading's result in the product's words (DESIGN §7), with a shape so that colour is
 * never alone. Every result the technician cannot act on yet is one phrase, "Can’t tell",
 * with its reason after it.
 */
import { SHAPE } from '../shapes';
import type { ReadingVerdict } from './reading';

/** What a result badge can say: a verdict, or `open` for OL judged as an open circuit. */
export type ResultKey = ReadingVerdict | 'open';
export type ResultTone = 'ok' | 'bad' | 'cant_tell' | 'none';

/** The one phrase for every result that needs another look before it means anything. */
export const CANT_TELL = 'Can’t tell';

export const RESULTS: Record<ResultKey, { word: string; reason?: string; shape: string; tone: ResultTone }> = {
	within: { word: 'OK', shape: SHAPE.ok, tone: 'ok' },
	low: { word: 'Under spec', shape: SHAPE.low, tone: 'bad' },
	high: { word: 'Over spec', shape: SHAPE.high, tone: 'bad' },
	open: { word: 'Open circuit (OL)', shape: SHAPE.none, tone: 'bad' },
	not_ok: { word: 'Not OK', shape: SHAPE.seen, tone: 'bad' },
	borderline: { word: CANT_TELL, reason: 're-check on a lower range', shape: SHAPE.cantTell, tone: 'cant_tell' },
	depends: {
		word: CANT_TELL,
		reason: 'the cold and hot specs disagree: measure the part’s temperature',
		shape: SHAPE.cantTell,
		tone: 'cant_tell'
	},
	bad_zero: { word: CANT_TELL, reason: 're-zero the leads', shape: SHAPE.cantTell, tone: 'cant_tell' },
	over_range: { word: CANT_TELL, reason: 'over range: re-check one range up', shape: SHAPE.cantTell, tone: 'cant_tell' },
	no_spec: { word: 'No figure', reason: 'the sheet has none for this temperature', shape: SHAPE.noFigure, tone: 'none' }
};

/** The reason of a borderline result when the meter has no finer range to go to. */
export const NO_FINER_RANGE = 'too close to a limit for this meter: use a finer meter or the four-wire method';

/**
 * The key to show for a reading: OL judged `high` (on the meter's highest range, on a check
 * that does not accept an open circuit) is an open circuit.
 */
export function resultKey(verdict: ReadingVerdict, value: number | null, openOk: boolean): ResultKey {
	if (verdict === 'high' && value === Infinity && !openOk) return 'open';
	return verdict;
}

/** The result in words: "OK", "Under spec", or "Can’t tell — re-zero the leads". */
export function resultText(key: ResultKey, { finerRange = true }: { finerRange?: boolean } = {}): string {
	const r = RESULTS[key];
	const reason = key === 'borderline' && !finerRange ? NO_FINER_RANGE : r.reason;
	return reason ? `${r.word} — ${reason}` : r.word;
}

/** Whether a result may be saved: not one read against leads that need reading again. */
export const maySave = (key: ResultKey) => key !== 'bad_zero' && key !== 'over_range';
