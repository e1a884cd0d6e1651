/**
 * Battery, charging and circuit arithmetic for the day's other tests. Plain functions on
 * SI units: volts, amperes, ampere-hours, ohms, °C; fractions 0–1. The tables and the
 * sources behind them are listed beside each constant; a sheet's own figures always win.
 */

export type BatteryType = 'flooded' | 'agm' | 'efb';

/** One point of a rest-voltage table: a state of charge (0–1) and its rest voltage in V. */
export type SocPoint = { soc: number; volts: number };

export type SocTable = {
	/** Where the figures come from, shown with the result. */
	source: string;
	/** The temperature the table's voltages hold at, °C. */
	refC: number;
	/** Highest state of charge first. */
	points: SocPoint[];
	/** Whether the table's last point is "discharged" (0 %); otherwise below it is unknown. */
	reachesEmpty: boolean;
};

/**
 * Rest voltage of a 12 V flooded lead-acid battery at 26.7 °C (80 °F): the table battery
 * trade bodies publish (Battery Council International, as reproduced by battery makers).
 */
export const FLOODED_SOC: SocTable = {
	source: 'Battery Council International rest-voltage table (flooded, 26.7 °C)',
	refC: ((80 - 32) * 5) / 9, // 80 °F ≈ 26.7 °C
	points: [
		{ soc: 1, volts: 12.65 },
		{ soc: 0.75, volts: 12.45 },
		{ soc: 0.5, volts: 12.24 },
		{ soc: 0.25, volts: 12.06 },
		{ soc: 0, volts: 11.89 }
	],
	reachesEmpty: true
};

/**
 * Rest voltage of a 12 V AGM battery at 25 °C: one battery maker's published figures (the
 * 100 % figure is given as 12.80–12.84 V; the lower end is used, so a battery reading 12.80 V
 * counts as full). Makers differ; there is no rest-voltage figure for "discharged".
 */
export const AGM_SOC: SocTable = {
	source: "a battery maker's AGM rest-voltage table (25 °C)",
	refC: 25,
	points: [
		{ soc: 1, volts: 12.8 },
		{ soc: 0.75, volts: 12.55 },
		{ soc: 0.5, volts: 12.2 },
		{ soc: 0.25, volts: 11.75 }
	],
	reachesEmpty: false
};

/** Rest-voltage tables by battery type. EFB is a flooded design: common practice uses the flooded table. */
export const SOC_TABLES: Record<BatteryType, SocTable> = {
	flooded: FLOODED_SOC,
	agm: AGM_SOC,
	efb: { ...FLOODED_SOC, source: `${FLOODED_SOC.source}; EFB is a flooded design (common practice)` }
};

/**
 * Temperature correction of a 12 V battery's rest voltage: about 0.024 V per 10 °F, i.e.
 * 0.024 / (10 × 5/9) ≈ 0.00432 V per °C, taken off below the table's temperature and added
 * above it (battery makers' published correction).
 */
export const REST_VOLTS_PER_C = 0.024 / (10 * (5 / 9));

/**
 * The rest voltage read at `tempC` expressed at the table's reference temperature: a cold
 * battery reads low for the same charge, so the correction adds back what the cold took.
 */
export function restVoltsAtReference(restVolts: number, tempC: number, refC: number): number {
	return restVolts + REST_VOLTS_PER_C * (refC - tempC);
}

export type SocResult = {
	/** State of charge, 0–1 (interpolated linearly between the table's points). */
	fraction: number;
	/** The reading below the lowest point of a table that does not reach empty: at most `fraction`. */
	atMost: boolean;
	/** The rest voltage at the table's temperature, V. */
	correctedVolts: number;
	table: SocTable;
};

/**
 * State of charge (0–1) of a 12 V lead-acid battery from its rest (open-circuit) voltage in
 * volts, read with the surface charge gone, for its type at `tempC` (°C). Linear between the
 * table's points; 1 above the full figure; 0 at or below "discharged" (flooded, EFB); for AGM,
 * whose table stops at 25 %, a lower reading answers 0.25 with `atMost`.
 */
export function stateOfChargeDetail(restVolts: number, type: BatteryType, tempC: number): SocResult {
	const table = SOC_TABLES[type];
	const v = restVoltsAtReference(restVolts, tempC, table.refC);
	const pts = table.points;
	const result = (fraction: number, atMost = false): SocResult => ({ fraction, atMost, correctedVolts: v, table });
	if (v >= pts[0].volts) return result(1);
	const last = pts[pts.length - 1];
	if (v <= last.volts) return result(last.soc, !table.reachesEmpty);
	for (let i = 1; i < pts.length; i++) {
		const hi = pts[i - 1];
		const lo = pts[i];
		if (v >= lo.volts) return result(lo.soc + ((v - lo.volts) / (hi.volts - lo.volts)) * (hi.soc - lo.soc));
	}
	return result(last.soc, !table.reachesEmpty);
}

/** State of charge as a fraction 0–1 (see `stateOfChargeDetail`). */
export function stateOfCharge(restVolts: number, type: BatteryType, tempC: number): number {
	return stateOfChargeDetail(restVolts, type, tempC).fraction;
}

/**
 * Below this state of charge a load or conductance result says nothing about the battery's
 * health: charge and re-test. 75 % is common practice (testers' and makers' instructions ask
 * for at least 75 % before a load test).
 */
export const MIN_SOC_TO_JUDGE = 0.75;

/**
 * Minimum voltage during a load test at half the cold-cranking rating for 15 s, by battery
 * temperature (°C → V). Common practice (vehicle makers' service information); another
 * maker's table is lower below 0 °C, so the table is a parameter.
 */
export const LOAD_TEST_MINIMUM: { tempC: number; volts: number }[] = [
	{ tempC: 21, volts: 9.6 },
	{ tempC: 16, volts: 9.5 },
	{ tempC: 10, volts: 9.4 },
	{ tempC: 4, volts: 9.3 },
	{ tempC: -1, volts: 9.1 },
	{ tempC: -7, volts: 8.9 },
	{ tempC: -12, volts: 8.7 },
	{ tempC: -18, volts: 8.5 }
];

/**
 * The load test's minimum voltage at `tempC`, linear between the table's points and held
 * at its ends (warmer than the first point: the first point's figure; colder than the last:
 * the last's).
 */
export function loadTestMinimum(tempC: number, table = LOAD_TEST_MINIMUM): number {
	if (tempC >= table[0].tempC) return table[0].volts;
	const last = table[table.length - 1];
	if (tempC <= last.tempC) return last.volts;
	for (let i = 1; i < table.length; i++) {
		const hi = table[i - 1];
		const lo = table[i];
		if (tempC >= lo.tempC) return lo.volts + ((tempC - lo.tempC) / (hi.tempC - lo.tempC)) * (hi.volts - lo.volts);
	}
	return last.volts;
}

/** The cold-cranking rating standards whose figure a label may state. */
export type CrankingStandard = 'sae_j537' | 'en_50342_1';

/**
 * A conductance or load tester's measured cranking capability against the label's rating
 * (same standard): the fraction of the rating the battery still delivers.
 */
export function crankingCapability(measuredAmps: number, ratedAmps: number): number {
	if (!(ratedAmps > 0)) throw new RangeError('the rating must be above zero');
	return measuredAmps / ratedAmps;
}

/**
 * Days for a parasitic draw to take a battery from full to where it will no longer crank:
 * `capacityAh × usableFraction ÷ drawA ÷ 24`. `usableFraction` (0–1) is the share of the
 * rated capacity that can be drawn before the engine will not start — a setting (common
 * practice: about half, as a battery below about 50 % often will not crank a cold engine).
 */
export function daysToFlat(capacityAh: number, drawA: number, usableFraction: number): number {
	if (!(drawA > 0)) return Infinity;
	if (!(usableFraction > 0 && usableFraction <= 1)) throw new RangeError('usable fraction must be in (0, 1]');
	return (capacityAh * usableFraction) / drawA / 24;
}

/** Resistance in ohms of a connection that drops `dropV` volts carrying `currentA` amperes (Ohm's law). */
export function dropResistance(dropV: number, currentA: number): number {
	if (!(currentA > 0)) throw new RangeError('the current must be above zero');
	return dropV / currentA;
}

/**
 * SAE J541's limit for a starting-motor circuit's voltage drop at `currentA` amperes: 0.200 V
 * per 100 A for 12 V light and medium duty, 0.10 V per 100 A for heavy duty (at 20 °C;
 * motor, relays and solenoids excluded).
 */
export function j541DropLimit(currentA: number, duty: 'light' | 'heavy' = 'light'): number {
	return (currentA / 100) * (duty === 'heavy' ? 0.1 : 0.2);
}
