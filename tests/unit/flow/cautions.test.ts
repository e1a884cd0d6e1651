/**
 * Cautions at the step (DESIGN §8). The hazards are common practice in the trade; the app
 * always defers to local regulations and the vehicle maker's procedure.
 */
import { describe, expect, it } from 'vitest';
import { cautionsFor, DEFER } from '../../../src/lib/flow/cautions';

const ids = (c: Parameters<typeof cautionsFor>[0]) => cautionsFor(c).list.map((l) => l.id);
const text = (c: Parameters<typeof cautionsFor>[0]) => cautionsFor(c).list.map((l) => l.text).join(' ');

describe('cautions for a check', () => {
	it('asks for the key off and the part’s own pins for a key-off resistance check', () => {
		const c = { step: 'check' as const, hybrid: false, condition: 'key_off', quantity: 'resistance' };
		expect(ids(c)).toEqual(['key_off', 'own_pins']);
		expect(text(c)).toMatch(/module sits in parallel/);
		expect(cautionsFor(c).needsTap).toBe(false);
	});

	it.each(['key_on', 'cranking', 'idle', 'under_load'])(
		'gives a %s voltage check the running-engine cautions, not “ignition off”, and asks for a tap',
		(condition) => {
			const c = { step: 'check' as const, hybrid: false, condition, quantity: 'voltage' };
			expect(ids(c)).toContain('running');
			expect(ids(c)).not.toContain('key_off');
			expect(text(c)).toMatch(/belts/);
			expect(text(c)).toMatch(/fan can start by itself/);
			expect(text(c)).toMatch(/loose clothing/);
			expect(cautionsFor(c).needsTap).toBe(true);
		}
	);

	it('tells a voltage check to back-probe and never pierce the insulation', () => {
		expect(text({ step: 'check', hybrid: false, condition: 'key_on', quantity: 'voltage' })).toMatch(/never pierce the insulation/);
	});

	it('shows the battery caution while cranking at the battery', () => {
		expect(ids({ step: 'check', hybrid: false, condition: 'cranking', quantity: 'voltage_drop' })).toContain('battery');
	});

	it('puts the meter in series for a current check', () => {
		expect(ids({ step: 'check', hybrid: false, condition: 'key_off', quantity: 'current' })).toContain('in_series');
	});

	it('warns of hot parts after a run', () => {
		expect(ids({ step: 'check', hybrid: false, condition: 'key_off', quantity: 'resistance', hot: true })).toContain('hot_after_run');
	});

	it('brings the part’s own cautions from the spec library to the check', () => {
		const c = { step: 'check' as const, hybrid: false, condition: 'key_off', quantity: 'resistance', partCautions: ['hot_surface', 'fuel'] };
		expect(ids(c)).toEqual(['key_off', 'own_pins', 'part_hot_surface', 'part_fuel']);
	});
});

describe('cautions for hybrids and airbag parts', () => {
	it('puts high voltage and READY mode first on a hybrid, and asks for a tap', () => {
		const c = cautionsFor({ step: 'check', hybrid: true, condition: 'key_off', quantity: 'resistance' });
		expect(c.list.slice(0, 2).map((l) => l.id)).toEqual(['high_voltage', 'ready_mode']);
		expect(c.list[1].text).toMatch(/In READY mode the engine can start by itself: switch off and keep the key away/);
		expect(c.needsTap).toBe(true);
	});

	it('asks for the battery disconnected and the maker’s wait time on an airbag part', () => {
		const c = cautionsFor({ step: 'start', hybrid: false, partCautions: ['airbag'] });
		expect(c.list.map((l) => l.id)).toEqual(['airbag', 'battery']);
		expect(c.list[0].text).toMatch(/Disconnect the battery and wait the time the maker gives before you unplug any airbag connector/);
	});
});

describe('cautions for the spark and swap tests', () => {
	it('warns of high tension, fuel vapour and flooding at a spark test, and asks for a tap', () => {
		const c = cautionsFor({ step: 'spark', hybrid: false });
		const all = c.list.map((l) => l.text).join(' ');
		expect(all).toMatch(/Tens of kilovolts/);
		expect(all).toMatch(/fuel vapour/);
		expect(all).toMatch(/injector or fuel-pump fuse/);
		expect(all).toMatch(/open-circuit/);
		expect(c.needsTap).toBe(true);
	});

	it('never pulls a coil off a running engine at a swap test, and warns of hot coils and exhaust', () => {
		const c = cautionsFor({ step: 'swap', hybrid: false });
		expect(c.list.map((l) => l.id)).toEqual(['swap_engine_off', 'running', 'hot_after_run']);
		expect(c.list[0].text).toMatch(/Never pull a coil off with the engine running/);
		expect(c.list[2].text).toMatch(/coils, the exhaust/);
	});
});

describe('every caution card', () => {
	it.each([
		{ step: 'check' as const, hybrid: false, condition: 'key_off', quantity: 'resistance' },
		{ step: 'spark' as const, hybrid: true },
		{ step: 'swap' as const, hybrid: false },
		{ step: 'start' as const, hybrid: false, partCautions: ['airbag'] }
	])('ends by deferring to local regulations and the vehicle maker’s procedure (%o)', (c) => {
		expect(cautionsFor(c).defer).toBe(DEFER);
		expect(DEFER).toMatch(/local regulations and the vehicle maker’s procedure/);
	});

	it('names the set by its lines, so an acknowledged set is known again', () => {
		const a = cautionsFor({ step: 'check', hybrid: false, condition: 'key_off', quantity: 'resistance' });
		const b = cautionsFor({ step: 'check', hybrid: false, condition: 'idle', quantity: 'voltage' });
		expect(a.key).toBe('key_off+own_pins');
		expect(a.key).not.toBe(b.key);
	});
});
