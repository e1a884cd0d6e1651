/** The product's words for the spec library (DESIGN §7): kinds, quantities, conditions, cautions. */
import type { Caution, CheckCondition, CheckQuantity, ComponentKind } from '../schemas/component';
import { temperatureRangeText } from './band-words';

export const KIND_LABELS: Record<ComponentKind, string> = {
	ignition_coil: 'Ignition coil',
	coil_pack: 'Coil pack',
	injector: 'Injector',
	crank_cam_sensor: 'Crank/cam sensor',
	relay: 'Relay',
	glow_plug: 'Glow plug',
	heater_element: 'Heater element',
	battery: 'Battery',
	alternator: 'Alternator',
	other: 'Other'
};

export const QUANTITY_LABELS: Record<CheckQuantity, string> = {
	resistance: 'Resistance',
	voltage: 'Voltage',
	voltage_drop: 'Voltage drop',
	current: 'Current',
	spark: 'Spark',
	visual: 'Look and feel (visual)'
};

export const CONDITION_LABELS: Record<CheckCondition, string> = {
	key_off: 'Key off',
	key_on: 'Key on',
	cranking: 'Cranking',
	idle: 'Idle',
	under_load: 'Under load'
};

/** A caution's short name and the care it asks for; every one defers to local rules (DESIGN §8). */
export const CAUTION_TEXT: Record<Caution, { title: string; text: string }> = {
	airbag: {
		title: 'Airbag part',
		text: 'Never test with an ohmmeter: the meter’s current can fire it. The test screen refuses resistance checks on this part.'
	},
	high_voltage: {
		title: 'High voltage',
		text: 'Tens of kilovolts on the output side when it fires. Ignition off before unplugging; use an insulated, earthed tester; hands clear.'
	},
	hot_surface: {
		title: 'Hot surface',
		text: 'Can be hot enough to burn after the engine has run. Let it cool or wear suitable gloves.'
	},
	fuel: {
		title: 'Fuel system',
		text: 'No sparks or heat near fuel vapour; relieve pressure as the maker describes before opening the system.'
	}
};
export const CAUTION_FOOTNOTE =
	'Follow local regulations and the vehicle maker’s procedure; these notes do not replace them.';

/** The temperature at which the usual cold spec ends and the hot spec begins, °C (common practice). */
export const COLD_HOT_SPLIT_C = 50;
/** The usual top of a hot spec, °C (common practice). */
export const HOT_TOP_C = 100;

/** A band's temperatures in words: "below 50 °C", "50–100 °C", "100 °C and above". */
export { temperatureRangeText };

/** A band's short name: "Cold spec", "Hot spec", or its temperatures. */
export function bandShortName(b: { fromC: number | null; toC: number | null }): string {
	if (b.fromC === null && b.toC !== null && b.toC <= COLD_HOT_SPLIT_C) return 'Cold spec';
	if (b.fromC !== null && b.fromC >= COLD_HOT_SPLIT_C) return 'Hot spec';
	return b.fromC === null && b.toC === null ? 'Spec' : `Spec ${temperatureRangeText(b)}`;
}

/** A band's name in the product's words: cold spec, hot spec, or its temperature range. */
export function bandName(b: { fromC: number | null; toC: number | null }): string {
	const range = temperatureRangeText(b);
	if (b.fromC === null && b.toC !== null && b.toC <= COLD_HOT_SPLIT_C)
		return `Cold spec · ${range}`;
	if (b.fromC !== null && b.fromC >= COLD_HOT_SPLIT_C) return `Hot spec · ${range}`;
	return `Temperature band · ${range}`;
}
