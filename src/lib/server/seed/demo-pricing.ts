/**
 * The demo workshop's prices (invented figures): pounds, 20 % tax, labour at 68.00 an hour,
 * a 45.00 diagnostic fee, and a price list with the demo's coil and coil pack and two
 * labour jobs. Made once: a workshop with pricing already set is left as it is.
 */
import type { Actor } from '../auth/types';
import { addPriceItem, readPricing, savePricing } from '../quotes/pricing';

export async function seedDemoPricing(lead: Actor): Promise<number> {
	if (await readPricing(lead.workshopId)) return 0;
	await savePricing(lead, { currency: 'GBP', taxRateBp: 2000, labourRateMinor: 6800, diagnosticFeeMinor: 4500 });
	const items = [
		{ kind: 'part', partNumber: 'TB-IC-2041', label: 'Pencil ignition coil TB-IC-2041', priceMinor: 3840 },
		{ kind: 'part', partNumber: 'QX-CP-3307', label: 'Coil pack QX-CP-3307', priceMinor: 11200 },
		{ kind: 'labour', label: 'Fit one pencil coil', priceMinor: 6800, hoursMilli: 300 },
		{ kind: 'labour', label: 'Fit a coil pack', priceMinor: 6800, hoursMilli: 700 }
	];
	for (const i of items) await addPriceItem(lead, i);
	return 1 + items.length;
}
