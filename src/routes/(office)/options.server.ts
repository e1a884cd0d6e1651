/** Choices for the office forms: recent customers and vehicles, and who can be assigned. */
import type { Actor } from '$lib/server/auth/types';
import { isLead } from '$lib/roles';
import { read as readCustomer, searchCustomers } from '$lib/server/services/customers';
import { listAssignable } from '$lib/server/services/jobs';
import { readVehicle, searchVehicles } from '$lib/server/services/vehicles';

type Option = { value: string; label: string };

/** Up to 100 recently changed customers and vehicles; `keep` ids are always included. */
export async function jobFormOptions(
	actor: Actor,
	keep: { customerId?: unknown; vehicleId?: unknown }
) {
	const [customers, vehicles, assignees] = await Promise.all([
		searchCustomers(actor, { sort: '-updated', pageSize: 100 }),
		searchVehicles(actor, { sort: '-updated', pageSize: 100 }),
		isLead(actor) ? listAssignable(actor) : null
	]);
	const customerOptions = toCustomerOptions(customers.items);
	const vehicleOptions: Option[] = vehicles.items.map((v) => ({
		value: v.id,
		label: [v.plate, `${v.make} ${v.model}`, v.customer?.name].filter(Boolean).join(' · ')
	}));
	await includeKept(actor, keep, customerOptions, vehicleOptions);
	return {
		customers: customerOptions,
		vehicles: vehicleOptions,
		assignees: assignees?.map((u) => ({ value: u.id, label: u.name })) ?? null
	};
}

const toCustomerOptions = (items: { id: string; name: string; phone: string | null }[]) =>
	items
		.map((c) => ({ value: c.id, label: [c.name, c.phone].filter(Boolean).join(' · ') }))
		.sort((a, b) => a.label.localeCompare(b.label));

/** Up to 100 recently changed customers, for a vehicle's owner; `keep` is always included. */
export async function customerOptions(actor: Actor, keep: unknown): Promise<Option[]> {
	const list = toCustomerOptions(
		(await searchCustomers(actor, { sort: '-updated', pageSize: 100 })).items
	);
	await includeKept(actor, { customerId: keep }, list, []);
	return list;
}

async function includeKept(
	actor: Actor,
	keep: { customerId?: unknown; vehicleId?: unknown },
	customers: Option[],
	vehicles: Option[]
) {
	const id = (v: unknown) => (typeof v === 'string' && v ? v : null);
	const c = id(keep.customerId);
	if (c && !customers.some((o) => o.value === c)) {
		const rec = await readCustomer(actor, c).catch(() => null);
		if (rec) customers.unshift({ value: c, label: String(rec.name) });
	}
	const v = id(keep.vehicleId);
	if (v && !vehicles.some((o) => o.value === v)) {
		const rec = await readVehicle(actor, v).catch(() => null);
		const x = rec?.vehicle as { plate?: string; make: string; model: string } | undefined;
		if (x)
			vehicles.unshift({
				value: v,
				label: [x.plate, `${x.make} ${x.model}`].filter(Boolean).join(' · ')
			});
	}
}
