/**
 * How the stored rows of a job and what hangs under it (customer, vehicle, tests) become the
 * public records that the API and the change feed send (plain JSON). Pure functions of a
 * row, so that the aggregates and the reassignment copies share them without importing
 * each other.
 */
type Row = {
	id: string;
	version: number;
	deletedAt: Date | null;
	get: (k: string) => unknown;
};

const pick = (r: Row, fields: readonly string[], orNull = true) =>
	Object.fromEntries(fields.map((f) => [f, orNull ? (r.get(f) ?? null) : r.get(f)]));

export const JOB_FIELDS = [
	'number',
	'customerId',
	'vehicleId',
	'complaint',
	'location',
	'assigneeId',
	'status',
	'codesBefore',
	'codesAfter',
	'notes'
] as const;

export const VEHICLE_FIELDS = [
	'customerId',
	'vin',
	'chassisNo',
	'chassisReason',
	'plate',
	'make',
	'model',
	'year',
	'engineCode',
	'cylinders',
	'odometer',
	'odometerUnit',
	'hybrid'
] as const;

export const TEST_FIELDS = [
	'jobId',
	'componentId',
	'sheetId',
	'sheetVersion',
	'partNumber',
	'position',
	'technicianId',
	'needsSignOff',
	'retestOf',
	'meter',
	'temperature',
	'state',
	'notes'
] as const;

export const customerRecord = (r: Row) => ({
	id: r.id,
	version: r.version,
	name: r.get('name'),
	phone: r.get('phone') ?? null,
	email: r.get('email') ?? null,
	reportConsent: Boolean(r.get('reportConsent')),
	deleted: r.deletedAt != null,
	updatedAt: r.get('updatedAt')
});

export const vehicleRecord = (r: Row) => ({
	id: r.id,
	version: r.version,
	...pick(r, VEHICLE_FIELDS),
	hybrid: Boolean(r.get('hybrid')),
	deleted: r.deletedAt != null,
	updatedAt: r.get('updatedAt')
});

export const jobRecord = (r: Row) => ({
	id: r.id,
	version: r.version,
	...pick(r, JOB_FIELDS),
	deleted: r.deletedAt != null,
	createdAt: r.get('createdAt'),
	updatedAt: r.get('updatedAt')
});

export const testRecord = (r: Row) => ({
	id: r.id,
	version: r.version,
	...pick(r, TEST_FIELDS, false),
	needsSignOff: Boolean(r.get('needsSignOff')),
	retestOf: r.get('retestOf') ?? null,
	deleted: r.deletedAt != null
});
