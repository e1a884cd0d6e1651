import { describe, expect, it } from 'vitest';
import { CANT_TELL, maySave, RESULTS, resultKey, resultText, type ResultKey } from '../../../src/lib/flow/results';
import { SHAPE } from '../../../src/lib/shapes';

describe('the result words', () => {
	it('shows OL judged high (on the highest range) as “Open circuit (OL)”', () => {
		expect(resultKey('high', Infinity, false)).toBe('open');
		expect(resultText('open')).toBe('Open circuit (OL)');
		expect(resultKey('within', Infinity, true)).toBe('within');
		expect(resultKey('high', 0.7, false)).toBe('high');
	});

	it.each([
		['bad_zero', 'Can’t tell — re-zero the leads'],
		['over_range', 'Can’t tell — over range: re-check one range up'],
		['borderline', 'Can’t tell — re-check on a lower range']
	] as const)('says %s as “%s”', (key, words) => {
		expect(resultText(key)).toBe(words);
	});

	it('says a borderline result without a finer range so, instead of sending the technician to one', () => {
		expect(resultText('borderline', { finerRange: false })).toMatch(/^Can’t tell — too close to a limit for this meter/);
	});

	it('uses the one phrase “Can’t tell” and one shape for every result that needs another look', () => {
		const cantTell = (Object.keys(RESULTS) as ResultKey[]).filter((k) => RESULTS[k].tone === 'cant_tell');
		expect(cantTell.sort()).toEqual(['bad_zero', 'borderline', 'depends', 'over_range']);
		for (const k of cantTell) {
			expect(RESULTS[k].word).toBe(CANT_TELL);
			expect(RESULTS[k].shape).toBe(SHAPE.cantTell);
		}
	});

	it('never saves a reading against leads to read again, nor an over-range one', () => {
		expect(maySave('bad_zero')).toBe(false);
		expect(maySave('over_range')).toBe(false);
		expect(maySave('borderline')).toBe(true);
		expect(maySave('within')).toBe(true);
	});
});

describe('the shapes', () => {
	it('give each meaning its own shape', () => {
		const shapes = Object.values(SHAPE);
		expect(new Set(shapes).size).toBe(shapes.length);
	});

	it('give each result shape one meaning: only “Can’t tell” results share theirs', () => {
		const byShape = new Map<string, Set<string>>();
		for (const r of Object.values(RESULTS)) byShape.set(r.shape, (byShape.get(r.shape) ?? new Set()).add(r.word));
		for (const words of byShape.values()) expect(words.size).toBe(1);
	});
});
