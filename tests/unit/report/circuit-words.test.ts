/**
 * Circuit tests in the customer's words. The figures are those of the judge's own sourced
 * unit tests (`tests/unit/flow/circuit.test.ts`), judged here by `judgeCircuit` itself, so a
 * change to the judge or the words shows up here.
 */
import { describe, expect, it } from 'vitest';
import { defaultsFor, judgeCircuit, type CircuitKind, type CircuitInputs } from '../../../src/lib/flow/circuit';
import { buildReport } from '../../../src/lib/report/words';
import type { CircuitFacts } from '../../../src/lib/report/types';
import { facts } from './fixtures';

function circuit(kind: CircuitKind, inputs: CircuitInputs): CircuitFacts {
	const r = judgeCircuit(kind, inputs);
	return {
		kind,
		partNumber: typeof inputs.partNumber === 'string' ? inputs.partNumber : null,
		verdict: r.verdict,
		lines: r.lines,
		days: r.days ?? null,
		side: r.side ?? null,
		circuit: typeof inputs.circuit === 'string' ? inputs.circuit : null,
		which: kind === 'sensor' ? (inputs.which === 'cam' ? 'cam' : 'crank') : null
	};
}

// 12.24 V at 80 °F (26.7 °C) is 50 % charged: Battery Council International's open-circuit table.
const FLAT_BATTERY = circuit('battery', { batteryType: 'flooded', standard: 'sae_j537', ratedA: 600, tempC: (80 - 32) * (5 / 9), surfaceGone: true, restV: 12.24, method: 'conductance', measuredA: 250, minCapability: 75 });
// 70 Ah × 50 % ÷ 0.12 A ÷ 24 h = 12.15 days (arithmetic); 50 mA limit: common practice.
const DRAW = circuit('parasitic', { capacityAh: 70, usablePct: 50, drawMa: 120, limitMa: 50 });
// Relay makers' data sheets: coil about 85 Ω ± 10 %, contacts at most 0.2 V at 10 A.
const RELAY_BAD = circuit('relay', { ...defaultsFor('relay'), coilOhm: 120, clicks: 'yes', contactV: 0.015 });
// 13.5–14.8 V and ripple under 0.5 V AC: common practice.
const CHARGING_OK = circuit('charging', { minV: 13.5, maxV: 14.8, rippleMaxV: 0.5, offV: 14.2, onV: 13.9, rippleV: 0.2 });

describe('circuit tests in the customer’s report', () => {
	const doc = buildReport(facts({ tests: [], circuits: [FLAT_BATTERY, DRAW, RELAY_BAD, CHARGING_OK] }));
	const byTitle = (t: string) => doc.findings.find((f) => f.title.startsWith(t))!;

	it('gives each circuit test one finding with the workshop’s outcome, counted in the summary', () => {
		expect(doc.findings.map((f) => [f.title, f.outcomeText])).toEqual([
			['Battery', 'Can’t tell'],
			['Battery drain with the vehicle switched off', 'Out of spec'],
			['Relay', 'Out of spec'],
			['Charging system', 'OK']
		]);
		expect(doc.counts).toEqual({ ok: 1, out: 2, unclear: 1 });
	});

	it('says a flat battery needs charging before it can be judged, not that it is bad', () => {
		expect(byTitle('Battery').sentence).toBe('The battery was too flat to judge its condition: it needs a full charge and then testing again.');
		// Under 75 % charged a load or conductance result says nothing of the battery's health (the judge's MIN_SOC_TO_JUDGE, common practice).
		expect(byTitle('Battery').figures[0]).toEqual({ label: 'State of charge', value: '50 %', spec: 'at least 75 % to judge the battery', specLabel: 'Judged against', result: 'can’t tell — too flat to judge' });
	});

	it('gives the draw measured, its limit and the days to flat', () => {
		const f = byTitle('Battery drain');
		expect(f.figures).toEqual([{ label: 'Current drawn with everything off', value: '120 mA', spec: 'at most 50 mA', specLabel: 'Judged against', result: 'over spec' }]);
		expect(f.sentence).toContain('after about 12.2 days');
	});

	it('names what failed on the relay, with the coil’s figure against 76.5–93.5 Ω', () => {
		const f = byTitle('Relay');
		expect(f.sentence).toBe('The relay is faulty (resistance of the relay’s coil): it should be replaced.');
		expect(f.figures[0]).toMatchObject({ value: '120.0 Ω', spec: '76.5–93.5 Ω', result: 'over spec' });
	});

	it('lists each circuit test under what we tested, and never shows a code', () => {
		expect(doc.tested.map((t) => t.heading)).toContain('Charging system');
		const text = JSON.stringify(doc);
		for (const code of ['charge_retest', '"parasitic"', 'not_ok', 'cant_tell']) expect(text).not.toContain(code);
	});
});
