/** The technician's jobs as the phone holds them (IndexedDB), joined with customer and vehicle. */
import { getRecord, listRecords, type LocalDb, type LocalRecord } from '../client/local-db';
import { writeLocal } from '../client/outbox';
import type { Me } from '../client/session';
import type { JobStatus } from '../schemas/job';

export type FaultCode = { code: string; text: string };
export type JobView = {
	id: string;
	version: number;
	pending: number;
	number: number | null;
	complaint: string;
	location: string | null;
	status: JobStatus;
	notes: string | null;
	assigneeId: string | null;
	codesBefore: FaultCode[];
	codesAfter: FaultCode[];
	customer: { id: string; name: string; phone: string | null } | null;
	vehicle: { id: string; make: string; model: string; year: number | null; plate: string | null; vin: string | null; hybrid: boolean; engineCode: string | null; cylinders: number | null } | null;
};

/**
 * How a job is named on the phone. A job made on this phone has no number until the server
 * gives it one (numbers are the server's, whatever the channel); the next pull brings it.
 */
export function jobTitle(number: number | null): string {
	return number == null ? 'Job · number pending' : `Job ${number}`;
}

async function view(db: LocalDb, r: LocalRecord): Promise<JobView> {
	const d = r.data;
	const c = d.customerId ? await getRecord(db, 'customer', d.customerId as string) : undefined;
	const v = d.vehicleId ? await getRecord(db, 'vehicle', d.vehicleId as string) : undefined;
	return {
		id: r.id,
		version: r.version,
		pending: r.pending,
		number: (d.number as number) ?? null,
		complaint: (d.complaint as string) ?? '',
		location: (d.location as string) ?? null,
		status: (d.status as JobStatus) ?? 'open',
		notes: (d.notes as string) ?? null,
		assigneeId: (d.assigneeId as string) ?? null,
		codesBefore: (d.codesBefore as FaultCode[]) ?? [],
		codesAfter: (d.codesAfter as FaultCode[]) ?? [],
		customer: c ? { id: c.id, name: c.data.name as string, phone: (c.data.phone as string) ?? null } : null,
		vehicle: v
			? {
					id: v.id,
					make: v.data.make as string,
					model: v.data.model as string,
					year: (v.data.year as number) ?? null,
					plate: (v.data.plate as string) ?? null,
					vin: (v.data.vin as string) ?? null,
					hybrid: Boolean(v.data.hybrid),
					engineCode: (v.data.engineCode as string) ?? null,
					cylinders: (v.data.cylinders as number) ?? null
				}
			: null
	};
}

/** Open jobs: the user's own, or the workshop's for leads and owners; newest number first. */
export async function listOpenJobs(db: LocalDb, me: Me): Promise<JobView[]> {
	const lead = me.role === 'lead' || me.role === 'owner';
	const rows = (await listRecords(db, 'job')).filter(
		(r) => r.data.status !== 'closed' && (lead || r.data.assigneeId === me.id)
	);
	const views = await Promise.all(rows.map((r) => view(db, r)));
	return views.sort((a, b) => (b.number ?? 0) - (a.number ?? 0));
}

export async function readJob(db: LocalDb, id: string): Promise<JobView | null> {
	const r = await getRecord(db, 'job', id);
	return r ? view(db, r) : null;
}

/** Change fields of a job on the phone (queued to send). */
export async function patchJob(db: LocalDb, id: string, fields: Partial<Pick<JobView, 'status' | 'notes' | 'codesAfter' | 'codesBefore'>>) {
	return writeLocal(db, { entity: 'job', id, kind: 'patch', fields, jobId: id });
}
