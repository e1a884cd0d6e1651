import { describe, expect, it } from 'vitest';
import { defaultsFor, inputsFromTyped, judgeCircuit, KINDS, minutesLeft, stepsFor, typedDefaults, CIRCUIT_KINDS } from '$lib/flow/circuit';
import { cautionsFor } from '$lib/flow/cautions';

/** 80 °F in °C: the flooded rest-voltage table's temperature. */
const F80 = (80 - 32) * (5 / 9);
const battery = (more: Record<string, unknown>) =>
	judgeCircuit('battery', { batteryType: 'flooded', standard: 'en_50342_1', ratedA: 680, tempC: F80, surfaceGone: true, method: 'conductance', minCapability: 75, ...more } as never);

describe('battery test', () => {
	it('reads 12.45 V at 80 °F as 75 % charged (Battery Council International table) and judges the tester against the label', () => {
		const r = battery({ restV: 12.45, measuredA: 600 });
		expect(r.lines[0]).toMatchObject({ label: 'State of charge', verdict: 'ok', text: '75 %' });
		// 600 A ÷ 680 A = 88 % of the EN 50342-1 rating (arithmetic); at least 75 % (common practice, from memory).
		expect(r.lines[1]).toMatchObject({ label: 'Cranking capability', verdict: 'ok' });
		expect(r.lines[1].text).toContain('88 %');
		expect(r.working.join(' ')).toContain('EN 50342-1');
		expect(r.verdict).toBe('ok');
	});

	it('says "charge and re-test", never a bad battery, at 50 % (12.24 V, BCI table; 75 % to judge is common practice)', () => {
		const r = battery({ restV: 12.24, measuredA: 200 });
		expect(r.verdict).toBe('charge_retest');
		expect(r.summary).toMatch(/^Charge and re-test — the battery is 50 % charged/);
		expect(r.lines.map((l) => l.label)).toEqual(['State of charge']);
	});

	it('corrects a cold reading by 0.024 V per 10 °F before the table (battery makers’ correction)', () => {
		// 12.45 V at 10 °C: + 0.024/(10×5/9) V/°C × (26.67 − 10) °C = 12.522 V → 75 % + 0.072/0.20 × 25 % = 84 %.
		const r = battery({ restV: 12.45, tempC: 10, measuredA: 600 });
		expect(r.working[0]).toContain('12.52 V');
		expect(r.lines[0].text).toBe('84 %');
	});

	it('judges a load test against the minimum for the battery’s temperature (9.4 V at 10 °C, common practice: makers’ service information)', () => {
		expect(battery({ restV: 12.6, tempC: 10, method: 'load', loadV: 9.3 }).verdict).toBe('low');
		expect(battery({ restV: 12.6, tempC: 10, method: 'load', loadV: 9.5 }).verdict).toBe('ok');
	});

	it('judges the cranking voltage against the same table (9.6 V at 21 °C) and names what failed', () => {
		const r = battery({ restV: 12.6, tempC: 21, measuredA: 650, crankV: 9.0 });
		expect(r.lines.find((l) => l.label === 'Cranking voltage')?.verdict).toBe('low');
		expect(r.verdict).toBe('low');
		expect(r.summary).toContain('cranking voltage');
	});

	it('reads an AGM battery below its table as "at most 25 %" and asks to charge it', () => {
		const r = judgeCircuit('battery', { batteryType: 'agm', tempC: 25, restV: 11.6, surfaceGone: true, method: 'conductance', ratedA: 700, measuredA: 100 });
		expect(r.verdict).toBe('charge_retest');
		expect(r.summary).toContain('at most 25 %');
	});

	it("can't tell before the surface charge is gone", () => {
		expect(battery({ restV: 12.7, surfaceGone: false, measuredA: 700 }).verdict).toBe('cant_tell');
	});
});

describe('parasitic draw', () => {
	it('works out days to flat with the working: 70 Ah × 50 % ÷ 0.120 A ÷ 24 = 12.2 days (arithmetic)', () => {
		const r = judgeCircuit('parasitic', { capacityAh: 70, usablePct: 50, drawMa: 120, limitMa: 50, fuses: [] });
		expect(r.verdict).toBe('high');
		expect(r.days).toBeCloseTo(35 / 0.12 / 24, 9);
		expect(r.working).toEqual(['70 Ah × 50 % usable = 35.0 Ah', '35.0 Ah ÷ 0.120 A = 292 h', '292 h ÷ 24 = 12.2 days']);
		expect(r.summary).toContain('12.2 days');
	});

	it('is OK at or under the limit (50 mA, common practice) and ranks the fuses by millivolts', () => {
		const r = judgeCircuit('parasitic', { capacityAh: 60, usablePct: 50, drawMa: 30, limitMa: 50, fuses: [{ fuse: 'F3', mv: 0.2 }, { fuse: 'F12', mv: 4.1 }, { fuse: 'F7', mv: 1 }] });
		expect(r.verdict).toBe('ok');
		expect(r.ranked?.map((f) => f.fuse)).toEqual(['F12', 'F7', 'F3']);
		expect(r.working.at(-1)).toContain('fuse F12');
	});
});

describe('voltage drop', () => {
	it('names the feed side when it is over 0.5 V (common practice: makers’ information)', () => {
		const r = judgeCircuit('drop', { circuit: 'starter', limitV: 0.5, feedV: 0.9, earthV: 0.2 });
		expect(r.verdict).toBe('high');
		expect(r.side).toBe('feed');
		expect(r.summary).toMatch(/starter’s feed side/);
		expect(r.lines.map((l) => l.verdict)).toEqual(['high', 'ok']);
	});

	it('names the larger side when both are over', () => {
		const r = judgeCircuit('drop', { circuit: 'coil', limitV: 0.5, feedV: 0.6, earthV: 0.8 });
		expect(r.side).toBe('earth');
		expect(r.summary).toContain('(and the feed side)');
	});

	it('shows the resistance by Ohm’s law (2.0 V at 200 A is 10 mΩ, a battery maker’s training text) and SAE J541’s 0.2 V per 100 A', () => {
		const r = judgeCircuit('drop', { circuit: 'starter', limitV: 0.5, feedV: 2.0, earthV: 0.1, currentA: 200 });
		expect(r.working[0]).toContain('10.0 mΩ');
		expect(r.working[2]).toContain('at most 0.40 V');
	});
});

describe('charging', () => {
	const ok = { minV: 13.5, maxV: 14.8, rippleMaxV: 0.5 };
	it('is OK within 13.5–14.8 V with loads off and on and ripple under 0.5 V AC (common practice)', () => {
		const r = judgeCircuit('charging', { ...ok, offV: 14.2, onV: 13.9, rippleV: 0.2 });
		expect(r.verdict).toBe('ok');
		expect(r.working[0]).toContain('0.30 V');
	});
	it('says low when the loads pull it under, and names the ripple', () => {
		expect(judgeCircuit('charging', { ...ok, offV: 14.0, onV: 13.2, rippleV: 0.2 }).verdict).toBe('low');
		const r = judgeCircuit('charging', { ...ok, offV: 14.0, onV: 13.8, rippleV: 0.8 });
		expect(r.verdict).toBe('high');
		expect(r.summary).toMatch(/^Ripple too high/);
	});
});

describe('relay', () => {
	// Relay makers' data sheets: coil about 85 Ω ± 10 %, contacts at most 0.2 V at 10 A (15 mV typical).
	it('is OK at 85 Ω, a click and 15 mV across the contacts', () => {
		expect(judgeCircuit('relay', { ...defaultsFor('relay'), coilOhm: 85, clicks: 'yes', contactV: 0.015 }).verdict).toBe('ok');
	});
	it('flags a coil over 93.5 Ω, no click, or contacts over 0.2 V', () => {
		expect(judgeCircuit('relay', { ...defaultsFor('relay'), coilOhm: 120, clicks: 'yes', contactV: 0.015 }).verdict).toBe('high');
		expect(judgeCircuit('relay', { ...defaultsFor('relay'), coilOhm: 85, clicks: 'no', contactV: 0.015 }).verdict).toBe('not_ok');
		expect(judgeCircuit('relay', { ...defaultsFor('relay'), coilOhm: 85, clicks: 'yes', contactV: 0.35 }).summary).toContain('contacts');
	});
});

describe('crank and cam sensors', () => {
	it('judges an inductive sensor against the sheet’s bands (figures invented for the test)', () => {
		expect(judgeCircuit('sensor', { sensorType: 'inductive', ohms: 800, ohmMin: 500, ohmMax: 1500, acV: 1.2, acMinV: 0.5 }).verdict).toBe('ok');
		expect(judgeCircuit('sensor', { sensorType: 'inductive', ohms: 2000, ohmMin: 500, ohmMax: 1500, acV: 1.2, acMinV: 0.5 }).verdict).toBe('high');
	});
	it('checks a 5 V Hall sensor’s supply, earth and switching (high over 3.8 V, common practice)', () => {
		const base = { sensorType: 'hall', supplyNominal: '5', supplyV: 5.02, earthV: 0.03, lowV: 0.2 };
		expect(judgeCircuit('sensor', { ...base, highV: 4.9 }).verdict).toBe('ok');
		expect(judgeCircuit('sensor', { ...base, highV: 3.0 }).verdict).toBe('not_ok');
	});
});

describe('the screen’s figures', () => {
	it('takes a decimal comma, refuses words and figures out of range, and skips steps not shown', () => {
		const typed = { ...typedDefaults('battery'), restV: '12,45', ratedA: 'lots', tempC: '99' };
		const { inputs, errors } = inputsFromTyped('battery', typed);
		expect(inputs.restV).toBe(12.45);
		expect(errors.ratedA).toMatch(/as a number/);
		expect(errors.tempC).toMatch(/between -30 and 60/);
		const sensor = inputsFromTyped('sensor', { ...typedDefaults('sensor'), sensorType: 'hall', ohms: '800', supplyV: '5' });
		expect(sensor.inputs.ohms).toBeUndefined();
		expect(sensor.inputs.supplyV).toBe(5);
		expect(stepsFor('sensor', { sensorType: 'hall' }).map((s) => s.title)).not.toContain('Inductive: winding and output');
	});

	it('keeps fuse rows with a name and a figure and says what is wrong with the others', () => {
		const { inputs, errors } = inputsFromTyped('parasitic', { ...typedDefaults('parasitic'), fuses: [{ fuse: 'F1', mv: '0,4' }, { fuse: '', mv: '' }, { fuse: 'F2', mv: 'x' }] });
		expect(inputs.fuses).toEqual([{ fuse: 'F1', mv: 0.4 }]);
		expect(errors.fuse2).toMatch(/millivolts/);
	});

	it('runs the wait from its stored start time, so a locked screen or a reload picks it up', () => {
		const start = '2026-12-02T10:00:00.000Z';
		expect(minutesLeft(start, 45, Date.parse('2026-12-02T10:10:00.000Z'))).toBeCloseTo(35, 9);
		expect(minutesLeft(start, 45, Date.parse('2026-12-02T11:00:00.000Z'))).toBe(0);
		expect(minutesLeft(null, 45, Date.now())).toBeNull();
	});

	it('gives every kind a title, steps and at least one field per step', () => {
		for (const k of CIRCUIT_KINDS) {
			expect(KINDS[k].steps.length).toBeGreaterThan(0);
			for (const s of KINDS[k].steps) expect(s.fields.length).toBeGreaterThan(0);
		}
	});
});

describe('circuit cautions', () => {
	it('battery work: explosive gas (a tap), eye protection and clamp order', () => {
		const c = cautionsFor({ step: 'circuit', hybrid: false, circuit: ['battery'] });
		expect(c.list.map((l) => l.id)).toEqual(['battery_gas', 'eye_protection', 'clamp_order']);
		expect(c.list[0].text).toMatch(/no sparks, flames or smoking near the vents/);
		expect(c.list[2].text).toMatch(/earth \(−\) off first and back on last/);
		expect(c.needsTap).toBe(true);
	});
	it('a running engine at the charging test: the running-engine caution, which needs a tap', () => {
		const c = cautionsFor({ step: 'circuit', hybrid: false, circuit: KINDS.charging.steps[1].cautions });
		expect(c.list.map((l) => l.id)).toEqual(['running']);
		expect(c.needsTap).toBe(true);
	});
	it('a hybrid adds the high-voltage lines', () => {
		expect(cautionsFor({ step: 'circuit', hybrid: true, circuit: ['battery'] }).list[0].id).toBe('high_voltage');
	});
});

describe('limits from the part’s sheet', () => {
	it('fills each limit from its check’s band and leaves the rest at the usual figure', async () => {
		const { sheetLimits } = await import('$lib/flow/circuit');
		// Invented sheet figures (as a sheet in the library would hold them).
		const limits = sheetLimits('charging', [
			{ key: 'regulated', bands: [{ fromC: null, toC: null, min: 13.8, max: 14.6 }] },
			{ key: 'other', bands: [{ fromC: null, toC: null, min: 1, max: 2 }] }
		]);
		expect(limits).toEqual({ minV: 13.8, maxV: 14.6 });
		expect(sheetLimits('relay', [{ key: 'coil', bands: [{ fromC: null, toC: 50, min: 70, max: 90 }, { fromC: 50, toC: null, min: 75, max: 100 }] }])).toEqual({ coilMin: 70, coilMax: 90 });
		expect(sheetLimits('drop', [{ key: 'regulated', bands: [] }])).toEqual({});
	});
});

describe('figures out of their range', () => {
	it('are "can’t tell", never a throw, whatever a record carries', () => {
		expect(judgeCircuit('parasitic', { capacityAh: 70, usablePct: 0, drawMa: 120 }).summary).toMatch(/^Can’t tell — share of the capacity usable/);
		expect(judgeCircuit('battery', { ratedA: -5, restV: 12.6, tempC: 20, surfaceGone: true, measuredA: 500 }).verdict).toBe('cant_tell');
		expect(judgeCircuit('drop', { feedV: 0.1, earthV: 0.1, currentA: -1 }).verdict).toBe('cant_tell');
		expect(judgeCircuit('battery', { batteryType: 'gel', restV: 12.6, tempC: 20, surfaceGone: true }).summary).toBe('Can’t tell — choose battery type.');
	});
});
