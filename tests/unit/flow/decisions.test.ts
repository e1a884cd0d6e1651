import { describe, expect, it } from 'vitest';
import { cautionsFor, comparePositions, rangeWarning, refuseTest, resultKey, swapConclusion, unitWarning } from '../../../src/lib/flow/decisions';

// Coil figures: cold spec 0.36–0.55 Ω primary, 9–15.4 kΩ secondary — common practice.
const PRIMARY = [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }];
const SECONDARY = [{ fromC: null, toC: 50, min: 9000, max: 15400 }];

describe('starting a test', () => {
	it('refuses an airbag component: never tested with an ohmmeter', () => {
		expect(refuseTest({ role: 'lead', hybrid: false, cautions: ['airbag'] })).toMatch(/never tested with an ohmmeter/);
	});
	it('refuses an apprentice on a hybrid or electric vehicle, and no one else', () => {
		expect(refuseTest({ role: 'apprentice', hybrid: true, cautions: [] })).toMatch(/Apprentices/);
		expect(refuseTest({ role: 'technician', hybrid: true, cautions: [] })).toBeNull();
		expect(refuseTest({ role: 'apprentice', hybrid: false, cautions: ['high_voltage'] })).toBeNull();
	});
});

describe('cautions at the step', () => {
	it('puts the high-voltage warning first on every on-car step of a hybrid, and asks for a tap', () => {
		for (const step of ['measure', 'spark', 'running'] as const) {
			const c = cautionsFor(step, { hybrid: true });
			expect(c.list[0]).toMatch(/high voltage/);
			expect(c.needsTap).toBe(true);
		}
	});
	it('asks for a tap before a spark test, and defers to local regulations and the maker', () => {
		const c = cautionsFor('spark', { hybrid: false });
		expect(c.needsTap).toBe(true);
		expect(c.list.join(' ')).toMatch(/open-circuit/);
		expect(c.list.at(-1)).toMatch(/local regulations and the vehicle maker/);
		expect(cautionsFor('measure', { hybrid: false }).needsTap).toBe(false);
	});
});

describe('before a reading', () => {
	it('warns when a 0.1 Ω range with ±(0.5 % + 2 counts) cannot resolve 0.36–0.55 Ω', () => {
		expect(rangeWarning({ resolution: 0.1, pctOfReading: 0.5, counts: 2, label: '200 Ω' }, PRIMARY)).toMatch(/lower range|four-wire/);
		expect(rangeWarning({ resolution: 0.01, pctOfReading: 0.5, counts: 2 }, PRIMARY)).toBeNull();
	});
	it('warns when 12.28 looks like kΩ typed as Ω, and not for a plausible value', () => {
		expect(unitWarning(12.28, SECONDARY)).toMatch(/kΩ instead of Ω/);
		expect(unitWarning(12280, SECONDARY)).toBeNull();
		expect(unitWarning(450, PRIMARY)).toMatch(/Ω instead of kΩ/);
	});
});

describe('the result words', () => {
	it('shows OL on a check that does not accept it as "open"', () => {
		expect(resultKey('high', Infinity, false)).toBe('open');
		expect(resultKey('within', Infinity, true)).toBe('within');
		expect(resultKey('high', 0.7, false)).toBe('high');
	});
});

describe('the cylinder comparison', () => {
	it('names the odd one out among four coils of one part number', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.41, 3: 0.75, 4: 0.43 })).toEqual({ kind: 'odd', odd: ['3'] });
	});
	it('flags nothing when four agree within 10 %', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.41, 3: 0.44, 4: 0.43 })).toEqual({ kind: 'odd', odd: [] });
	});
	it('says only whether two differ, never which is the culprit', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.75 })).toEqual({ kind: 'pair', differ: true });
		expect(comparePositions({ 1: 0.42, 2: 0.44 })).toEqual({ kind: 'pair', differ: false });
		expect(comparePositions({ 1: 0.42 })).toEqual({ kind: 'none' });
	});
});

describe('the swap test', () => {
	it('says the fault followed the coil when the misfire moved with it', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 22, 3: 0 })).toBe('fault_followed');
	});
	it('says the fault stayed when the misfire stayed in its cylinder', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 0, 3: 19 })).toBe('fault_stayed');
	});
	it('calls a fault that simply went away inconclusive', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 0, 3: 0 })).toBe('inconclusive');
	});
});
