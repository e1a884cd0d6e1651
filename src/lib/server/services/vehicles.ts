/** Vehicles on the one write path. */
import { vehicleCreate, vehiclePatch } from '../../schemas/vehicle';
import { Vehicle } from '../db/models';
import { defineAggregate } from './write-path';

const FIELDS = [
	'customerId',
	'vin',
	'chassisNo',
	'chassisReason',
	'plate',
	'make',
	'model',
	'year',
	'engineCode',
	'odometer',
	'odometerUnit',
	'hybrid'
] as const;

export const vehicles = defineAggregate({
	entity: 'vehicle',
	model: Vehicle,
	createSchema: vehicleCreate,
	patchSchema: vehiclePatch,
	toRecord: (r) => ({
		id: r.id,
		version: r.version,
		...Object.fromEntries(FIELDS.map((f) => [f, r.get(f)])),
		hybrid: Boolean(r.get('hybrid')),
		deleted: r.deletedAt != null,
		updatedAt: r.get('updatedAt')
	})
});
