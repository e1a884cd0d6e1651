/**
 * Cautions at the step they belong to (DESIGN §8): worked out from the step, the check's
 * condition and quantity, the vehicle and the part's own cautions from the spec library.
 * Only high-risk ones need a tap before going on. Every card ends by deferring to local
 * regulations and the vehicle maker's procedure.
 */
import { CAUTION_TEXT } from '../library/labels';
import type { Caution as PartCaution } from '../schemas/component';

export type CautionId =
	| 'high_voltage'
	| 'ready_mode'
	| 'airbag'
	| 'battery'
	| 'key_off'
	| 'own_pins'
	| 'back_probe'
	| 'in_series'
	| 'running'
	| 'hot_after_run'
	| 'spark'
	| 'swap_engine_off'
	| 'battery_gas'
	| 'eye_protection'
	| 'clamp_order'
	| `part_${PartCaution}`;

export type CautionLine = { id: CautionId; title: string; text: string; needsTap: boolean };

/** The closing line of every caution card. */
export const DEFER = 'Follow local regulations and the vehicle maker’s procedure; these notes do not replace them.';

const LINES: Record<Exclude<CautionId, `part_${string}`>, Omit<CautionLine, 'id'>> = {
	high_voltage: {
		title: 'High voltage',
		text: 'Hybrid or electric vehicle: do not touch the orange cables or high-voltage parts unless trained and authorised.',
		needsTap: true
	},
	ready_mode: {
		title: 'READY mode',
		text: 'In READY mode the engine can start by itself: switch off and keep the key away from the car while you work.',
		needsTap: true
	},
	airbag: {
		title: 'Airbag part',
		text: 'Disconnect the battery and wait the time the maker gives before you unplug any airbag connector. Never measure an airbag part with an ohmmeter.',
		needsTap: true
	},
	battery: {
		title: 'Battery',
		text: 'Hydrogen gas: no sparks or flames near it; wear eye protection; earth lead off first and back on last.',
		needsTap: false
	},
	key_off: {
		title: 'Ignition off',
		text: 'Ignition off and the key out before you unplug anything or measure resistance.',
		needsTap: false
	},
	own_pins: {
		title: 'On the part’s own pins',
		text: 'Unplug the part and measure on its own pins: through a connected harness a module sits in parallel and the reading is wrong.',
		needsTap: false
	},
	back_probe: {
		title: 'Back-probe',
		text: 'Back-probe the connector; never pierce the insulation.',
		needsTap: false
	},
	in_series: {
		title: 'Meter in series',
		text: 'Current: the meter goes in series on its current input, never across a supply.',
		needsTap: false
	},
	running: {
		title: 'Engine may turn',
		text: 'Keep hands, leads and loose clothing clear of belts, pulleys and the fan; the fan can start by itself, even with the key out. Hot coolant is under pressure; ventilate the exhaust fumes.',
		needsTap: true
	},
	hot_after_run: {
		title: 'Hot after a run',
		text: 'After a run the coils, the exhaust and the coolant are hot: let them cool or wear suitable gloves.',
		needsTap: false
	},
	spark: {
		title: 'Spark test',
		text: 'Tens of kilovolts: use an insulated, earthed spark tester, keep hands clear, never fire a coil open-circuit. Take out the injector or fuel-pump fuse (or unplug that cylinder’s injector) so the cylinder is not flooded; no fuel vapour nearby. People with pacemakers stay clear.',
		needsTap: true
	},
	battery_gas: {
		title: 'Explosive gas',
		text: 'A battery gives off hydrogen, which explodes: no sparks, flames or smoking near the vents; switch the tester off before its clamps go on or come off, and ventilate.',
		needsTap: true
	},
	eye_protection: {
		title: 'Eye protection',
		text: 'Wear eye protection and gloves: the acid burns, and a battery can burst.',
		needsTap: false
	},
	clamp_order: {
		title: 'Clamp order',
		text: 'Tester: red clamp on + first, then black on −; off in the reverse order. Disconnecting the battery: earth (−) off first and back on last.',
		needsTap: false
	},
	swap_engine_off: {
		title: 'Engine off to move a coil',
		text: 'Never pull a coil off with the engine running: switch off, then move it.',
		needsTap: true
	}
};

const partLine = (c: PartCaution): CautionLine => ({
	id: `part_${c}`,
	title: `This part: ${CAUTION_TEXT[c].title.toLowerCase()}`,
	text: CAUTION_TEXT[c].text,
	needsTap: false
});

export type CautionStep = 'start' | 'check' | 'spark' | 'swap' | 'circuit';
export type CautionContext = {
	step: CautionStep;
	/** Hybrid or electric vehicle. */
	hybrid: boolean;
	/** The part's own cautions from the spec library. */
	partCautions?: readonly string[];
	/** The check's condition (key_off, key_on, cranking, idle, under_load). */
	condition?: string | null;
	/** The check's quantity (resistance, voltage, voltage_drop, current, …). */
	quantity?: string | null;
	/** The part has just run (hot). */
	hot?: boolean;
	/** A circuit test's step: what it involves (battery work, running or cranking engine, …). */
	circuit?: readonly ('battery' | 'running' | 'cranking' | 'in_series' | 'back_probe' | 'key_off')[];
};

const RUNNING = new Set(['key_on', 'cranking', 'idle', 'under_load']);

/** Which cautions a step carries, in the order shown. */
function idsFor(c: CautionContext): CautionId[] {
	const ids: CautionId[] = [];
	const part = new Set(c.partCautions ?? []);
	if (c.hybrid) ids.push('high_voltage', 'ready_mode');
	if (part.has('airbag')) ids.push('airbag', 'battery');
	const running = c.step === 'swap' || (c.step === 'check' && RUNNING.has(c.condition ?? ''));
	if (c.step === 'check') {
		const resistance = c.quantity === 'resistance';
		if (resistance && !running) ids.push('key_off');
		if (resistance) ids.push('own_pins');
		if (!resistance && c.quantity !== 'visual') ids.push('back_probe');
		if (c.quantity === 'current') ids.push('in_series');
		if (!resistance && (c.condition === 'cranking' || c.condition === 'under_load')) ids.push('battery');
	}
	if (c.step === 'circuit') {
		const has = new Set(c.circuit ?? []);
		if (has.has('battery')) ids.push('battery_gas', 'eye_protection', 'clamp_order');
		if (has.has('key_off')) ids.push('key_off');
		if (has.has('back_probe')) ids.push('back_probe');
		if (has.has('in_series')) ids.push('in_series');
		if (has.has('running') || has.has('cranking')) ids.push('running');
	}
	if (c.step === 'spark') ids.push('spark');
	if (c.step === 'swap') ids.push('swap_engine_off');
	if (running) ids.push('running');
	if (c.step === 'swap' || c.hot) ids.push('hot_after_run');
	for (const p of ['high_voltage', 'hot_surface', 'fuel'] as const) if (part.has(p)) ids.push(`part_${p}`);
	return [...new Set(ids)];
}

/**
 * The cautions shown at a step: the lines, whether any needs a tap before going on, and a key
 * naming the set (a set acknowledged once in a test folds to one line after that).
 */
export function cautionsFor(c: CautionContext): { list: CautionLine[]; needsTap: boolean; key: string; defer: string } {
	const list = idsFor(c).map((id) =>
		id.startsWith('part_') ? partLine(id.slice(5) as PartCaution) : { id, ...LINES[id as keyof typeof LINES] }
	);
	return { list, needsTap: list.some((l) => l.needsTap), key: list.map((l) => l.id).join('+'), defer: DEFER };
}
