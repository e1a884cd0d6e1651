import { fail } from '@sveltejs/kit';
import { parseAmount, parseHours, parseRate, toDecimal, formatMoney, CURRENCIES, type Currency } from '$lib/money';
import { guardPage, LEADS } from '$lib/server/auth/guards';
import { actorOf } from '$lib/server/auth/types';
import { failFrom, valuesOf } from '$lib/server/forms';
import { addPriceItem, listPriceItems, readPricing, removePriceItem, savePricing } from '$lib/server/quotes/pricing';

export async function load(event) {
	const user = guardPage(event, LEADS);
	const pricing = await readPricing(user.workshopId);
	const cur = (pricing?.currency ?? 'GBP') as Currency;
	const items = await listPriceItems(user.workshopId);
	return {
		title: 'Prices and tax',
		currencies: Object.keys(CURRENCIES),
		pricing: pricing && {
			currency: pricing.currency,
			taxRate: (pricing.taxRateBp / 100).toString(),
			labourRate: toDecimal(pricing.labourRateMinor, cur),
			diagnosticFee: toDecimal(pricing.diagnosticFeeMinor, cur)
		},
		items: items.map((i) => ({ ...i, price: formatMoney(i.priceMinor, cur), hours: i.hoursMilli ? i.hoursMilli / 1000 : null }))
	};
}

const text = (fd: FormData, k: string) => String(fd.get(k) ?? '');

export const actions = {
	settings: async (event) => {
		const actor = actorOf(guardPage(event, LEADS));
		const fd = await event.request.formData();
		const currency = text(fd, 'currency') as Currency;
		const cur = currency in CURRENCIES ? currency : 'GBP';
		const fields: Record<string, string> = {};
		const rate = parseRate(text(fd, 'taxRate'));
		const labour = parseAmount(text(fd, 'labourRate'), cur);
		const fee = parseAmount(text(fd, 'diagnosticFee'), cur);
		if (rate === null) fields.taxRate = 'Type the tax rate as a percentage, e.g. 20 or 8.25';
		if (labour === null) fields.labourRate = 'Type the hourly rate, e.g. 72.50';
		if (fee === null) fields.diagnosticFee = 'Type the fee, e.g. 45.00';
		if (Object.keys(fields).length) return fail(400, { action: 'settings', values: valuesOf(fd), fields });
		try {
			await savePricing(actor, { currency, taxRateBp: rate, labourRateMinor: labour, diagnosticFeeMinor: fee });
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'settings');
		}
		return { action: 'settings', saved: true };
	},
	add: async (event) => {
		const actor = actorOf(guardPage(event, LEADS));
		const fd = await event.request.formData();
		const cur = ((await readPricing(actor.workshopId))?.currency ?? 'GBP') as Currency;
		const kind = text(fd, 'kind') === 'labour' ? 'labour' : 'part';
		const price = parseAmount(text(fd, 'price'), cur);
		const hours = kind === 'labour' ? parseHours(text(fd, 'hours')) : null;
		if (price === null) return fail(400, { action: 'add', values: valuesOf(fd), fields: { price: 'Type the price, e.g. 48.99' } as Record<string, string> });
		try {
			await addPriceItem(actor, { kind, partNumber: text(fd, 'partNumber').trim() || null, label: text(fd, 'label'), priceMinor: price, hoursMilli: hours });
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'add');
		}
		return { action: 'add', saved: true };
	},
	remove: async (event) => {
		const actor = actorOf(guardPage(event, LEADS));
		const fd = await event.request.formData();
		try {
			await removePriceItem(actor, text(fd, 'id'));
		} catch (e) {
			return failFrom(e, valuesOf(fd), 'remove');
		}
		return { action: 'remove', saved: true };
	}
};
