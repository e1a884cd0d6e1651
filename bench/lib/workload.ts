/** What the sync and overview benches make their readings from: invented figures only. */

/** Invented figures: an ignition coil with a two-band primary and a secondary winding (base units). */
export const COIL_CHECKS = [
	{
		key: 'primary',
		label: 'Primary winding',
		quantity: 'resistance',
		from: '1',
		to: '2',
		condition: 'key_off',
		unit: 'Ω',
		openOk: false,
		bands: [
			{ fromC: null, toC: 50, min: 0.4, max: 0.6 },
			{ fromC: 50, toC: null, min: 0.5, max: 0.7 }
		]
	},
	{
		key: 'secondary',
		label: 'Secondary winding',
		quantity: 'resistance',
		from: '1',
		to: 'HT',
		condition: 'key_off',
		unit: 'kΩ',
		openOk: false,
		bands: [{ fromC: null, toC: null, min: 5000, max: 8000 }]
	}
];

/** A small deterministic PRNG (mulberry32) so every run makes the same kind of values. */
export function prng(seed: number) {
	return () => {
		seed = (seed + 0x6d2b79f5) | 0;
		let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
		t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}
