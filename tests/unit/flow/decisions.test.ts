import { describe, expect, it } from 'vitest';
import {
	comparePositions,
	cylindersFor,
	noFigureText,
	positionLabel,
	rangeWarning,
	refuseTest,
	sparkEstimate,
	swapConclusion,
	swapFinding,
	swapMessage,
	unitWarning
} from '../../../src/lib/flow/decisions';

// Coil figures: cold spec 0.36–0.55 Ω primary, 9–15.4 kΩ secondary — common practice.
const PRIMARY = [{ fromC: null, toC: 50, min: 0.36, max: 0.55 }];
const SECONDARY = [{ fromC: null, toC: 50, min: 9000, max: 15400 }];

describe('starting a test', () => {
	it('refuses an airbag part: never tested with an ohmmeter', () => {
		expect(refuseTest({ role: 'lead', hybrid: false, cautions: ['airbag'] })).toMatch(/Airbag parts are never tested with an ohmmeter/);
	});
	it('refuses an apprentice on a hybrid or electric vehicle, and no one else', () => {
		expect(refuseTest({ role: 'apprentice', hybrid: true, cautions: [] })).toMatch(/Apprentices/);
		expect(refuseTest({ role: 'technician', hybrid: true, cautions: [] })).toBeNull();
		expect(refuseTest({ role: 'apprentice', hybrid: false, cautions: ['high_voltage'] })).toBeNull();
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
		// 0.45 typed with kΩ chosen is 450 Ω: meant Ω. 450 typed in Ω: meant mΩ.
		expect(unitWarning(450, PRIMARY, 'kΩ')).toMatch(/This looks like Ω instead of kΩ/);
		expect(unitWarning(450, PRIMARY, 'Ω')).toMatch(/mΩ instead of Ω/);
	});
	it('names volts and millivolts for a voltage typed in the wrong unit', () => {
		// A feed of 11.5–15 V (common practice, charging voltage range) typed as 12.4 mV.
		const feed = [{ fromC: null, toC: null, min: 11.5, max: 15 }];
		expect(unitWarning(0.0124, feed, 'mV')).toMatch(/V instead of mV/);
		// A drop of at most 0.1–0.5 V read as 250 V (typed in V, meant mV).
		const drop = [{ fromC: null, toC: null, min: 0.1, max: 0.5 }];
		expect(unitWarning(250, drop, 'V')).toMatch(/mV instead of V/);
	});
	it('names amps and milliamps for a current typed in the wrong unit', () => {
		// A parasitic draw limit of 10–50 mA (common practice, makers’ information) typed as 35 A.
		expect(unitWarning(35, [{ fromC: null, toC: null, min: 0.01, max: 0.05 }], 'A')).toMatch(/mA instead of A/);
	});
});

describe('when the sheet has no figure', () => {
	const bands = [
		{ fromC: null, toC: 50, min: 0.36, max: 0.55 },
		{ fromC: 50, toC: 100, min: 0.45, max: 0.65 }
	];
	it('says the temperature and what the sheet covers', () => {
		expect(noFigureText(bands, { mode: 'measured', tempC: 110 })).toBe(
			'No figure for 110 °C; the sheet covers below 50 °C and 50–100 °C.'
		);
	});
	it('says it for what the technician could tell, with the temperature taken for it', () => {
		expect(noFigureText([bands[1]], { mode: 'overnight' })).toBe(
			'No figure for a part that stood overnight (about 20 °C); the sheet covers 50–100 °C.'
		);
	});
	it('says when the sheet has no figure at all', () => {
		expect(noFigureText([], { mode: 'measured', tempC: 20 })).toMatch(/no figure for this check/);
	});
});

describe('the position comparison', () => {
	it('names the odd one out among four coils of one part number', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.41, 3: 0.75, 4: 0.43 })).toEqual({ kind: 'odd', odd: ['3'] });
	});
	it('flags nothing when four agree within 10 %', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.41, 3: 0.44, 4: 0.43 })).toEqual({ kind: 'odd', odd: [] });
	});
	it('flags only the odd one of three: 0.50 / 0.50 / 0.80', () => {
		expect(comparePositions({ 1: 0.5, 2: 0.5, 3: 0.8 })).toEqual({ kind: 'odd', odd: ['3'] });
	});
	it('flags nothing within the readings’ combined ±', () => {
		// 0.10 / 0.10 / 0.13 Ω, each ±0.2 Ω on a 0.1 Ω-count range (meter accuracy form).
		expect(comparePositions({ 1: 0.1, 2: 0.1, 3: 0.13 }, 0.1, { 1: 0.2005, 2: 0.2005, 3: 0.2007 })).toEqual({ kind: 'odd', odd: [] });
	});
	it('says only whether two differ, never which is the culprit', () => {
		expect(comparePositions({ 1: 0.42, 2: 0.75 })).toEqual({ kind: 'pair', differ: true });
		expect(comparePositions({ 1: 0.42, 2: 0.44 })).toEqual({ kind: 'pair', differ: false });
		expect(comparePositions({ 1: 0.42 })).toEqual({ kind: 'none' });
	});
	it('does not call two differing by less than their combined ± different', () => {
		// 0.42 and 0.48 Ω are 14 % apart but only 0.06 Ω, inside ±0.044 + ±0.045 Ω.
		expect(comparePositions({ A: 0.42, B: 0.48 }, 0.1, { A: 0.044, B: 0.045 })).toEqual({ kind: 'pair', differ: false });
	});
});

describe('the swap test', () => {
	it('says the fault followed the coil when the misfire moved with it', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 22, 3: 0 })).toBe('fault_followed');
	});
	it('says the fault stayed, and points at the plug, injector, compression and valves', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 0, 3: 19 })).toBe('fault_stayed');
		expect(swapMessage('stayed', 'cylinder 3', 'cylinder 1')).toMatch(/plug, injector, compression and valves/);
	});
	it('calls a fault that simply went away inconclusive', () => {
		expect(swapConclusion('3', '1', { 3: 25 }, { 1: 0, 3: 0 })).toBe('inconclusive');
		expect(swapFinding('3', '1', { 3: 25 }, { 1: 0, 3: 0 })).toBe('went_away');
	});
	it('gives “no misfire before the swap” its own message', () => {
		expect(swapFinding('3', '1', { 3: 0 }, { 1: 4 })).toBe('no_misfire_before');
		expect(swapConclusion('3', '1', { 3: 0 }, { 1: 4 })).toBe('inconclusive');
		expect(swapMessage('no_misfire_before', 'cylinder 3', 'cylinder 1')).toMatch(/No misfire was counted on cylinder 3 before the swap/);
	});
	it('calls a misfire on both cylinders after the swap unclear', () => {
		expect(swapFinding('3', '1', { 3: 25 }, { 1: 9, 3: 12 })).toBe('unclear');
	});
});

describe('the spark test', () => {
	it('says “up to about” and what the figure assumes', () => {
		// Paschen's law with Raizer's constants for air (see spark.test.ts): 7 mm at 101 325 Pa
		// → 365 · 532 / (ln(15 · 532) − ln(ln(101))) ≈ 26 kV.
		const text = sparkEstimate(7)!;
		expect(text).toMatch(/^Up to about 26 kV to jump 7 mm/);
		expect(text).toMatch(/plain gap in still air at sea level/);
	});
	it('says nothing without a gap', () => {
		expect(sparkEstimate(null)).toBeNull();
		expect(sparkEstimate(0)).toBeNull();
	});
});

describe('positions', () => {
	const pack = [
		{ position: 'A', cylinders: [1, 4] },
		{ position: 'B', cylinders: [2, 3] }
	];
	it('names a pack’s coil by its coil map: “Coil A (cyl 1 & 4)”', () => {
		expect(positionLabel('A', pack)).toBe('Coil A (cyl 1 & 4)');
		expect(positionLabel('3')).toBe('Cylinder 3');
	});
	it('offers as many cylinders as the vehicle has', () => {
		expect(cylindersFor(6)).toEqual([1, 2, 3, 4, 5, 6]);
		expect(cylindersFor(3)).toEqual([1, 2, 3]);
	});
	it('offers four when the vehicle’s count is not recorded (common practice)', () => {
		expect(cylindersFor(null)).toEqual([1, 2, 3, 4]);
	});
	it('limits a pack to the cylinders its coils serve', () => {
		expect(cylindersFor(8, pack)).toEqual([1, 2, 3, 4]);
	});
});
