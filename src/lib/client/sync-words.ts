/**
 * What the sync screen says, in words a technician uses: the records and their fields by
 * name (never a field's code), why the workshop did not take a change, and why a sync
 * stopped. The server's own texts are for the logs, not for people.
 */
import type { SyncProblem } from './engine';

export const ENTITY_WORDS: Record<string, string> = {
	customer: 'Customer',
	vehicle: 'Vehicle',
	job: 'Job',
	test: 'Test',
	component: 'Part',
	sheet: 'Spec sheet',
	reading: 'Reading',
	signoff: 'Sign-off',
	swap_test: 'Swap test',
	photo: 'Photo',
	photo_mark: 'Photo removal or choice',
	spark_test: 'Spark test',
	quote: 'Quote',
	circuit_test: 'Battery or circuit test'
};

export const KIND_WORDS: Record<string, string> = { create: 'new', patch: 'change', delete: 'removal' };

/** Each field a phone may change, by the words the screens use for it. */
export const FIELD_WORDS: Record<string, string> = {
	complaint: 'complaint',
	location: 'location',
	notes: 'notes',
	status: 'status',
	assigneeId: 'who it is assigned to',
	customerId: 'customer',
	vehicleId: 'vehicle',
	codesBefore: 'fault codes before',
	codesAfter: 'fault codes after',
	number: 'job number',
	name: 'name',
	phone: 'phone',
	email: 'e-mail',
	address: 'address',
	reportConsent: 'report consent',
	vin: 'VIN',
	chassisNo: 'chassis number',
	chassisReason: 'reason for a chassis number',
	plate: 'plate',
	make: 'make',
	model: 'model',
	year: 'year',
	engineCode: 'engine code',
	cylinders: 'cylinders',
	odometer: 'odometer',
	odometerUnit: 'odometer unit',
	hybrid: 'hybrid or electric',
	state: 'finished or not',
	meter: 'meter and leads',
	temperature: 'temperature',
	position: 'positions',
	partNumber: 'part number',
	retestOf: 'the test it re-tests',
	checks: 'checks',
	source: 'source of the figures',
	request: 'what is on the quote',
	verbalName: 'customer who answered',
	verbalHow: 'how the customer answered',
	verbalDecision: 'customer’s answer',
	description: 'description',
	fitment: 'vehicles it fits',
	cautions: 'cautions',
	positions: 'coils and cylinders',
	kind: 'kind of part',
	jobId: 'job',
	componentId: 'part',
	sheetId: 'spec sheet',
	sheetVersion: 'spec sheet version'
};

/** The fields of a change in words: "status, notes"; a field without words is "other details". */
export function fieldsInWords(fields: Record<string, unknown>): string {
	const words = Object.keys(fields).map((f) => FIELD_WORDS[f] ?? 'other details');
	return [...new Set(words)].join(', ');
}

/** Why the workshop did not take a change, by its reason code. */
export const REASON_WORDS: Record<string, string> = {
	id_conflict: 'another record already has this one’s identity',
	not_found: 'the record is gone, or no longer yours',
	forbidden: 'your role does not allow this',
	invalid: 'some of it was not accepted; check what you entered',
	append_only: 'this kind of record cannot be changed once sent',
	stale_delete: 'someone changed it since; the lead decides',
	base_ahead: 'this phone is ahead of the workshop; sync again',
	server_error: 'the workshop could not store it; it is tried again'
};
export const reasonInWords = (reason: string | undefined) =>
	REASON_WORDS[reason ?? ''] ?? 'the workshop did not take it; the lead can see why';

/** Why the last sync stopped, in one plain sentence. */
export const PROBLEM_WORDS: Record<SyncProblem, string> = {
	no_connection: 'There was no connection to the workshop.',
	server_busy: 'The workshop was busy.',
	server_error: 'The workshop had a problem.',
	store_failed: 'The workshop could not store a change.',
	pull_refused: 'The workshop could not send its records to this phone.',
	signed_out: 'You are signed out.',
	unexpected: 'Something went wrong on this phone.'
};
