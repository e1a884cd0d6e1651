/**
 * Simulated phones for the cluster's failure test and benchmark: an invented workshop made
 * through the services, technicians signed in through the balancer, and readings pushed in
 * batches that are sent again after any failure, as the phone's sync client does.
 */
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { Client } from '../helpers/http';
import { evaluateReading, meterFor, type CheckSpec } from '../../src/lib/flow/reading';

export const PHONES = Number(process.env.CLUSTER_PHONES ?? 4);
export const BATCH = Number(process.env.CLUSTER_BATCH ?? 100);
const PASSWORD = 'cluster-password-2026';
export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Invented figures: a coil with a primary and a secondary winding. */
const CHECKS = [
	{ key: 'primary', label: 'Primary winding', quantity: 'resistance', from: '1', to: '2', condition: 'key_off', unit: 'Ω', openOk: false, bands: [{ fromC: null, toC: null, min: 0.4, max: 0.7 }] },
	{ key: 'secondary', label: 'Secondary winding', quantity: 'resistance', from: '1', to: 'HT', condition: 'key_off', unit: 'kΩ', openOk: false, bands: [{ fromC: null, toC: null, min: 5000, max: 8000 }] }
];
const METER = {
	name: 'Cluster meter',
	ranges: [
		{ label: '200 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 3 }
	],
	leadResistance: 0.1,
	relativeMode: false
};

export type Phone = { client: Client; deviceId: string; testIds: string[]; made: string[]; sent: number; retries: number; bad: string[] };

export function readingOps(phone: Phone, checks: CheckSpec[], n: number) {
	const ops = [];
	for (let i = 0; i < n; i++) {
		const check = checks[(phone.made.length + i) % checks.length];
		const primary = check.key === 'primary';
		const samples = [{ value: primary ? 0.65 : 6.4, unit: primary ? 'Ω' : 'kΩ' }];
		const r = evaluateReading(check, samples, meterFor(METER, primary ? '200 Ω' : '20 kΩ'), { mode: 'measured', tempC: 20 });
		ops.push({
			opId: uuidv7(),
			entity: 'reading',
			entityId: uuidv7(),
			kind: 'create',
			baseVersion: 0,
			fields: {
				testId: phone.testIds[i % phone.testIds.length],
				checkKey: check.key,
				rangeLabel: primary ? '200 Ω' : '20 kΩ',
				samples,
				deviceResult: { value: r.value, verdict: r.verdict }
			},
			deviceTime: new Date().toISOString()
		});
	}
	return ops;
}

/** Send one batch until the server answers it, as the phone's sync client does. */
export async function pushUntilAnswered(phone: Phone, ops: { opId: string }[]) {
	const body = JSON.stringify({ deviceId: phone.deviceId, ops });
	for (let attempt = 0; ; attempt++) {
		try {
			const r = await phone.client.json('POST', '/api/sync/push', body);
			if (r.status === 200) {
				const { results } = (await r.json()) as { results: { opId: string; status: string; reason?: string }[] };
				const transient = results.filter((x) => x.status === 'rejected' && x.reason === 'server_error');
				for (const x of results) {
					if (x.status !== 'applied' && x.status !== 'duplicate' && x.reason !== 'server_error') phone.bad.push(`${x.status} ${x.reason ?? ''}`);
				}
				if (!transient.length) return;
			} else if (r.status < 500 && r.status !== 429) {
				phone.bad.push(`HTTP ${r.status}: ${(await r.text()).slice(0, 200)}`);
				return;
			} else await r.body?.cancel();
		} catch {
			/* no answer: the app server or the balancer dropped it */
		}
		phone.retries++;
		await sleep(Math.min(2000, 100 * 2 ** Math.min(attempt, 4)));
	}
}

/** An invented workshop with one technician per phone, each signed in through `url`. */
export async function setUpPhones(url: string) {
	const dbMod = await import('../../src/lib/server/db');
	const { createUser, createWorkshop } = await import('../../src/lib/server/services/workshops');
	const { jobs } = await import('../../src/lib/server/services/jobs');
	const { components, sheets } = await import('../../src/lib/server/services/components');
	const { tests } = await import('../../src/lib/server/services/tests');

	const tag = uuidv7().slice(-8);
	const w = await createWorkshop(`Cluster ${tag} Auto Electrics (invented)`);
	const lead = await createUser(w.id, { email: `lead-${tag}@cluster.example`, name: 'Lead Cluster', role: 'lead', password: PASSWORD });
	const leadActor = { userId: lead.id, workshopId: w.id, role: 'lead' as const, deviceId: 'cluster-setup' };
	const componentId = (await components.create(leadActor, { partNumber: `CL-${tag}`, kind: 'ignition_coil' })).id as string;
	const draft = await sheets.create(leadActor, { componentId, checks: CHECKS });
	await sheets.update(leadActor, draft.id as string, draft.version as number, {}, { serverFields: { state: 'approved', approvedBy: lead.id, approvedAt: new Date() } });
	const [stored] = await dbMod.db().query<{ checks: string }>('SELECT checks FROM spec_sheets WHERE id = ?', { replacements: [draft.id], type: QueryTypes.SELECT });
	const checks = JSON.parse(stored.checks) as CheckSpec[];

	const phones: Phone[] = [];
	for (let p = 0; p < PHONES; p++) {
		const email = `tech${p + 1}-${tag}@cluster.example`;
		const tech = await createUser(w.id, { email, name: `Technician ${p + 1}`, role: 'technician', password: PASSWORD });
		const actor = { userId: tech.id, workshopId: w.id, role: 'technician' as const, deviceId: `cluster-phone-${p + 1}` };
		const jobId = (await jobs.create(leadActor, { complaint: `Misfire on cluster car ${p + 1}`, assigneeId: tech.id })).id as string;
		const testIds: string[] = [];
		for (const position of ['1', '2', '3', '4']) {
			const t = await tests.create(actor, { jobId, componentId, sheetId: draft.id as string, sheetVersion: 1, partNumber: `CL-${tag}`, position, meter: METER, temperature: { mode: 'measured', tempC: 20 } });
			testIds.push(t.id as string);
		}
		const client = new Client(url, `10.9.0.${p + 1}`);
		const r = await client.signIn(email, PASSWORD);
		if (r.status !== 303) throw new Error(`sign-in ${r.status}`);
		phones.push({ client, deviceId: uuidv7(), testIds, made: [], sent: 0, retries: 0, bad: [] });
	}

	await dbMod.closeDb();
	return { phones, checks, tag, workshopId: w.id, leadEmail: `lead-${tag}@cluster.example`, password: PASSWORD };
}

/** Each phone pushes batches of readings while `running()` holds. */
export function pushWhile(phones: Phone[], checks: CheckSpec[], running: () => boolean) {
	return Promise.all(
		phones.map(async (phone) => {
			while (running()) {
				const ops = readingOps(phone, checks, BATCH);
				phone.made.push(...ops.map((o) => o.entityId));
				await pushUntilAnswered(phone, ops);
				phone.sent += ops.length;
			}
		})
	);
}
