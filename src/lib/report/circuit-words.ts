/**
 * A circuit test (battery, parasitic draw, voltage drop, charging, relay, crank or cam sensor)
 * in the customer's words, like a coil test's finding (`words.ts`): its outcome (OK, out of
 * spec, can't tell), a title, one plain sentence, and each thing judged as a figure — what was
 * measured, the limit it was judged against and the result in words. The verdicts are the
 * workshop's own (`judgeCircuit` on the server); nothing is judged here. Pure.
 */
import type { CircuitVerdict } from '../flow/circuit';
import type { CircuitFacts, Figure, Finding, Outcome } from './types';

const OUTCOME: Record<CircuitVerdict, Outcome> = {
	ok: 'ok',
	low: 'out',
	high: 'out',
	not_ok: 'out',
	charge_retest: 'unclear',
	cant_tell: 'unclear'
};

/** A judged line's result, as a coil reading's result is worded. */
const RESULT: Record<CircuitVerdict, string> = {
	ok: 'OK',
	low: 'under spec',
	high: 'over spec',
	not_ok: 'not OK',
	charge_retest: 'can’t tell — too flat to judge',
	cant_tell: 'can’t tell'
};

/** What the customer calls each thing judged (the judge's labels are the technician's). */
const LABEL: Record<string, string> = {
	'State of charge': 'State of charge',
	'Under load': 'Voltage under load',
	'Cranking capability': 'Starting power',
	'Cranking voltage': 'Voltage while starting',
	Draw: 'Current drawn with everything off',
	'Feed side': 'Voltage lost on the supply side',
	'Earth side': 'Voltage lost on the earth side',
	'Idle, loads off': 'Charging voltage, lights and fan off',
	'Idle, loads on': 'Charging voltage, lights and fan on',
	'AC ripple': 'Unsteadiness of the output (ripple)',
	Coil: 'Resistance of the relay’s coil',
	Clicks: 'Switches when powered',
	Contacts: 'Voltage lost across the relay’s contacts',
	Supply: 'Sensor supply voltage',
	Earth: 'Voltage lost on the sensor’s earth',
	'Signal switching': 'Sensor signal',
	Winding: 'Resistance of the sensor’s winding',
	'AC output cranking': 'Sensor output while starting'
};

const CIRCUIT_NAME: Record<string, string> = {
	starter: 'starter circuit',
	coil: 'ignition coil’s supply',
	charging: 'charging circuit',
	other: 'circuit tested'
};

const lower = (s: string) => (s ? s[0].toLowerCase() + s.slice(1) : s);
const list = (items: string[]) =>
	items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`;

/** The title of a circuit test: what was tested, with the part number when one was typed. */
export function circuitTitle(c: CircuitFacts): string {
	const part = c.partNumber ? ` ${c.partNumber}` : '';
	switch (c.kind) {
		case 'battery':
			return `Battery${part}`;
		case 'parasitic':
			return 'Battery drain with the vehicle switched off';
		case 'drop':
			return `Voltage lost in the ${CIRCUIT_NAME[c.circuit ?? 'other'] ?? CIRCUIT_NAME.other}`;
		case 'charging':
			return `Charging system${part ? ` (alternator${part})` : ''}`;
		case 'relay':
			return `Relay${part}`;
		case 'sensor':
			return `${c.which === 'cam' ? 'Camshaft' : 'Crankshaft'} position sensor${part}`;
	}
}

const bad = (c: CircuitFacts) => c.lines.filter((l) => OUTCOME[l.verdict] === 'out');
const badLabels = (c: CircuitFacts) => list(bad(c).map((l) => lower(LABEL[l.label] ?? l.label)));

/** The one plain sentence of a circuit test. */
export function circuitSentence(c: CircuitFacts): string {
	if (c.verdict === 'cant_tell')
		return 'This test could not be completed, so it does not tell us the result yet: it needs to be done again.';
	switch (c.kind) {
		case 'battery':
			if (c.verdict === 'charge_retest')
				return 'The battery was too flat to judge its condition: it needs a full charge and then testing again.';
			return c.verdict === 'ok'
				? 'The battery is charged and delivered the starting power it is rated for.'
				: `The battery is charged but fell short (${badLabels(c)}): it should be replaced.`;
		case 'parasitic': {
			if (c.verdict === 'ok')
				return 'With the vehicle switched off and asleep, it draws no more current from the battery than it should.';
			const days =
				c.days != null
					? ` A charged battery would be too flat to start the engine after about ${c.days.toFixed(1)} days.`
					: '';
			return `With the vehicle switched off and asleep, something keeps drawing too much current from the battery: the cause needs tracing.${days}`;
		}
		case 'drop': {
			const circuit = CIRCUIT_NAME[c.circuit ?? 'other'] ?? CIRCUIT_NAME.other;
			if (c.verdict === 'ok')
				return `The wiring and connections of the ${circuit} lose no more voltage than they should.`;
			const side = c.side === 'earth' ? 'earth' : 'supply';
			return `Too much voltage is lost in the ${side} side of the ${circuit}: its connections need cleaning and tightening, then testing again.`;
		}
		case 'charging': {
			if (c.verdict === 'ok')
				return 'The alternator charges the battery correctly, with and without the lights and fan on.';
			const ripple = bad(c).some((l) => l.label === 'AC ripple');
			if (ripple)
				return 'The alternator’s output is unsteady, a sign that a part inside it is failing: it needs checking and probably replacing.';
			return c.verdict === 'high'
				? 'The alternator charges at too high a voltage, which can damage the battery: its voltage regulator needs attention.'
				: 'The alternator does not charge the battery enough: the drive belt, its wiring and then the alternator itself need checking.';
		}
		case 'relay':
			return c.verdict === 'ok'
				? 'The relay works correctly.'
				: `The relay is faulty (${badLabels(c)}): it should be replaced.`;
		case 'sensor': {
			const name = `${c.which === 'cam' ? 'camshaft' : 'crankshaft'} position sensor`;
			if (c.verdict === 'ok') return `The ${name} and its supply work correctly.`;
			const wiring = bad(c).every((l) => l.label === 'Supply' || l.label === 'Earth');
			return wiring
				? `The ${name}’s supply or earth wiring is out of spec (${badLabels(c)}): the wiring needs repair before the sensor is judged.`
				: `The ${name} is out of spec (${badLabels(c)}): it should be replaced.`;
		}
	}
}

/** Each thing judged: what was measured, against what, and the result in words. */
export function circuitFigures(c: CircuitFacts): Figure[] {
	return c.lines.map((l) => ({
		label: LABEL[l.label] ?? l.label,
		value: l.value ?? l.text,
		spec: l.spec ?? '',
		specLabel: 'Judged against',
		result: RESULT[l.verdict] ?? RESULT.cant_tell
	}));
}

export function circuitFinding(c: CircuitFacts): Finding {
	const outcome = OUTCOME[c.verdict] ?? 'unclear';
	const text = { ok: 'OK', out: 'Out of spec', unclear: 'Can’t tell' }[outcome];
	return {
		outcome,
		outcomeText: text,
		title: circuitTitle(c),
		sentence: circuitSentence(c),
		figures: circuitFigures(c)
	};
}

/** The "What we tested" entry of a circuit test. */
export function circuitTested(c: CircuitFacts): { heading: string; lines: string[] } {
	const checked = c.lines.map((l) => lower(LABEL[l.label] ?? l.label));
	return { heading: circuitTitle(c), lines: checked.length ? [`Checked: ${list(checked)}`] : [] };
}
