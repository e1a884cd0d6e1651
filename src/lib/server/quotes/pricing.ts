/**
 * The workshop's pricing (`workshop_pricing`: currency, tax rate, labour rate, diagnostic
 * fee) and price list (`price_items`), set by leads and owners on /pricing, and the one
 * function that prices a quote's request from them (`priceRequest`): the client names parts
 * and hours, the server finds every price — amounts are never taken from a client.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { quoteTotals, type Currency, type QuoteLine } from '../../money';
import { priceItemInput, pricingInput, type QuoteRequest } from '../../schemas/quote';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { writeAudit } from '../db/feed';
import { ForbiddenError, NotFoundError, ValidationError } from '../errors';
import { isLead } from '../../roles';

export type Pricing = {
	currency: Currency;
	taxRateBp: number;
	labourRateMinor: number;
	diagnosticFeeMinor: number;
	version: number;
};

export type PriceItem = {
	id: string;
	kind: 'part' | 'labour';
	partNumber: string | null;
	label: string;
	priceMinor: number;
	hoursMilli: number | null;
};

const q = <T extends object>(sql: string, replacements: unknown[], t?: Transaction): Promise<T[]> =>
	db().query<T>(sql, { replacements, type: QueryTypes.SELECT, transaction: t });

/** The workshop's pricing, or null when no lead has set it yet. */
export async function readPricing(workshopId: string, t?: Transaction): Promise<Pricing | null> {
	const [r] = await q<Record<string, unknown>>(
		'SELECT currency, tax_rate_bp, labour_rate_minor, diagnostic_fee_minor, version FROM workshop_pricing WHERE workshop_id = ?',
		[workshopId],
		t
	);
	if (!r) return null;
	return {
		currency: r.currency as Currency,
		taxRateBp: Number(r.tax_rate_bp),
		labourRateMinor: Number(r.labour_rate_minor),
		diagnosticFeeMinor: Number(r.diagnostic_fee_minor),
		version: Number(r.version)
	};
}

/** The live price list, parts then labour, by label. */
export async function listPriceItems(workshopId: string, t?: Transaction): Promise<PriceItem[]> {
	const rows = await q<Record<string, unknown>>(
		`SELECT id, kind, part_number, label, price_minor, hours_milli FROM price_items
		 WHERE workshop_id = ? AND active = 1 ORDER BY kind, label`,
		[workshopId],
		t
	);
	return rows.map((r) => ({
		id: r.id as string,
		kind: r.kind as 'part' | 'labour',
		partNumber: (r.part_number as string | null) ?? null,
		label: r.label as string,
		priceMinor: Number(r.price_minor),
		hoursMilli: r.hours_milli == null ? null : Number(r.hours_milli)
	}));
}

function parse<T>(schema: { safeParse: (v: unknown) => unknown }, input: unknown): T {
	const r = schema.safeParse(input) as { success: boolean; data: T; error: never };
	if (!r.success) throw ValidationError.fromZod(r.error);
	return r.data;
}

const leadsOnly = (actor: Actor) => {
	if (!isLead(actor)) throw new ForbiddenError('Only a workshop lead can change prices');
};

/** Set the workshop's currency, tax rate, labour rate and diagnostic fee (leads and owners). */
export async function savePricing(actor: Actor, input: unknown): Promise<Pricing> {
	leadsOnly(actor);
	const p = parse<ReturnType<typeof pricingInput.parse>>(pricingInput, input);
	return db().transaction(async (t) => {
		const old = await readPricing(actor.workshopId, t);
		await db().query(
			`INSERT INTO workshop_pricing (workshop_id, currency, tax_rate_bp, labour_rate_minor, diagnostic_fee_minor, version, updated_by, updated_at)
			 VALUES (?, ?, ?, ?, ?, 1, ?, UTC_TIMESTAMP(3))
			 ON DUPLICATE KEY UPDATE currency = VALUES(currency), tax_rate_bp = VALUES(tax_rate_bp),
			   labour_rate_minor = VALUES(labour_rate_minor), diagnostic_fee_minor = VALUES(diagnostic_fee_minor),
			   version = version + 1, updated_by = VALUES(updated_by), updated_at = VALUES(updated_at)`,
			{
				replacements: [actor.workshopId, p.currency, p.taxRateBp, p.labourRateMinor, p.diagnosticFeeMinor, actor.userId],
				transaction: t,
				type: QueryTypes.INSERT
			}
		);
		const changed = (Object.keys(p) as (keyof typeof p)[])
			.filter((k) => old?.[k] !== p[k])
			.map((k) => ({ field: k, old: old?.[k] ?? null, new: p[k] }));
		await writeAudit(t, actor, 'pricing', actor.workshopId, 'update', changed, null);
		return (await readPricing(actor.workshopId, t))!;
	});
}

/** Add an item to the price list (leads and owners). */
export async function addPriceItem(actor: Actor, input: unknown): Promise<string> {
	leadsOnly(actor);
	const p = parse<ReturnType<typeof priceItemInput.parse>>(priceItemInput, input);
	const id = uuidv7();
	await db().transaction(async (t) => {
		await db().query(
			`INSERT INTO price_items (id, workshop_id, kind, part_number, label, price_minor, hours_milli, active, created_at, updated_at)
			 VALUES (?, ?, ?, ?, ?, ?, ?, 1, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
			{
				replacements: [id, actor.workshopId, p.kind, p.kind === 'part' ? p.partNumber : null, p.label, p.priceMinor, p.kind === 'labour' ? p.hoursMilli : null],
				transaction: t,
				type: QueryTypes.INSERT
			}
		);
		await writeAudit(t, actor, 'price_item', id, 'create', Object.entries(p).map(([field, v]) => ({ field, old: null, new: v })), null);
	});
	return id;
}

/** Take an item off the price list (quotes that used it keep their priced lines). */
export async function removePriceItem(actor: Actor, id: string): Promise<void> {
	leadsOnly(actor);
	if (!/^[0-9a-f-]{36}$/i.test(id)) throw new NotFoundError('Price');
	await db().transaction(async (t) => {
		const [, meta] = (await db().query(
			'UPDATE price_items SET active = 0, updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND workshop_id = ? AND active = 1',
			{ replacements: [id, actor.workshopId], transaction: t, type: QueryTypes.UPDATE }
		)) as unknown as [unknown, number];
		if (!meta) throw new NotFoundError('Price');
		await writeAudit(t, actor, 'price_item', id, 'delete', [], null);
	});
}

/** A priced line as kept on the quote (and shown to the customer). */
export type PricedLine = QuoteLine & { amountMinor: number; partNumber?: string | null };

/** What the server sets on a quote from its request. */
export type PricedQuote = {
	lines: PricedLine[];
	currency: Currency;
	taxRateBp: number;
	netMinor: number;
	taxMinor: number;
	totalMinor: number;
};

/**
 * Price a request from the workshop's list and rates (400 naming the field when the
 * workshop has no prices yet or an item is not on its list).
 */
export async function priceRequest(workshopId: string, req: QuoteRequest, t?: Transaction): Promise<PricedQuote> {
	const pricing = await readPricing(workshopId, t);
	if (!pricing) throw new ValidationError({ request: 'The workshop has not set its prices yet — ask a lead' });
	const items = new Map((await listPriceItems(workshopId, t)).map((i) => [i.id, i]));
	const lines: (QuoteLine & { partNumber?: string | null })[] = [];
	req.parts.forEach((p, i) => {
		const item = items.get(p.itemId);
		if (!item || item.kind !== 'part') throw new ValidationError({ [`request.parts.${i}.itemId`]: 'Not on the price list' });
		lines.push({ kind: 'part', text: item.label, partNumber: item.partNumber, unitMinor: item.priceMinor, quantityMilli: p.quantityMilli });
	});
	req.labour.forEach((l, i) => {
		const item = l.itemId ? items.get(l.itemId) : null;
		if (l.itemId && (!item || item.kind !== 'labour'))
			throw new ValidationError({ [`request.labour.${i}.itemId`]: 'Not on the price list' });
		// A labour item's price is its rate per hour; without one, the workshop's labour rate.
		lines.push({ kind: 'labour', text: item?.label ?? 'Labour', unitMinor: item?.priceMinor ?? pricing.labourRateMinor, quantityMilli: l.hoursMilli });
	});
	if (req.diagnostic)
		lines.push({ kind: 'diagnostic', text: 'Diagnosis', unitMinor: pricing.diagnosticFeeMinor, quantityMilli: 1000 });
	if (!lines.length) throw new ValidationError({ request: 'Put at least one line on the quote' });
	const totals = quoteTotals(lines, pricing.taxRateBp);
	return {
		lines: totals.lines.map((l, i) => ({ ...l, partNumber: lines[i].partNumber ?? null })),
		currency: pricing.currency,
		taxRateBp: pricing.taxRateBp,
		netMinor: totals.netMinor,
		taxMinor: totals.taxMinor,
		totalMinor: totals.totalMinor
	};
}
