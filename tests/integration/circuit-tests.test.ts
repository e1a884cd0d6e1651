import { QueryTypes } from 'sequelize';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { jobs } from '../../src/lib/server/services/jobs';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';
import { create, pullAll, push } from '../helpers/sync';

const base = inject('baseURL');
let ws: Awaited<ReturnType<typeof makeWorkshop>>;
let tech: Client;
let jobId: string;

beforeAll(async () => {
	ws = await makeWorkshop('Circuit');
	jobId = (await jobs.create(ws.users.lead.actor, { complaint: 'No start after standing', assigneeId: ws.users.technician.id })).id as string;
	tech = new Client(base, '10.9.0.1');
	expect((await tech.signIn(ws.users.technician.email, TEST_PASSWORD)).status).toBe(303);
});

const rowOf = async (id: string) =>
	(await db().query<{ kind: string; server_verdict: string; mismatch: number; server_result: string; inputs: string }>(
		'SELECT kind, server_verdict, mismatch, server_result, inputs FROM circuit_tests WHERE id = ?',
		{ replacements: [id], type: QueryTypes.SELECT }
	))[0];

describe('circuit tests through sync', () => {
	it('judges a battery test again on the server and flags a phone that said otherwise', async () => {
		// 12.24 V at 80 °F is 50 % (Battery Council International table): charge and re-test, not a bad battery.
		const inputs = { batteryType: 'flooded', standard: 'sae_j537', ratedA: 600, tempC: (80 - 32) * (5 / 9), surfaceGone: true, restV: 12.24, method: 'conductance', measuredA: 250, minCapability: 75 };
		const honest = create('circuit_test', { jobId, kind: 'battery', inputs, deviceResult: { verdict: 'charge_retest' } });
		const wrong = create('circuit_test', { jobId, kind: 'battery', inputs, deviceResult: { verdict: 'ok' } });
		const results = await push(tech, 'phone-c', [honest, wrong]);
		expect(results.map((r) => r.status)).toEqual(['applied', 'applied']);
		const a = await rowOf(honest.entityId);
		expect(a).toMatchObject({ kind: 'battery', server_verdict: 'charge_retest', mismatch: 0 });
		expect(JSON.parse(a.server_result).summary).toMatch(/^Charge and re-test/);
		expect((await rowOf(wrong.entityId)).mismatch).toBe(1);
	});

	it('keeps the parasitic draw’s figures and working, and the phone gets the server’s result back', async () => {
		const t = create('circuit_test', { jobId, kind: 'parasitic', inputs: { capacityAh: 70, usablePct: 50, drawMa: 120, limitMa: 50, waitMin: 45, waitStartedAt: '2026-12-02T08:00:00.000Z', fuses: [{ fuse: 'F7', mv: 0.6 }, { fuse: 'F21', mv: 3.2 }] }, deviceResult: { verdict: 'high' } });
		expect((await push(tech, 'phone-c', [t]))[0].status).toBe('applied');
		const row = await rowOf(t.entityId);
		expect(row.server_verdict).toBe('high');
		const server = JSON.parse(row.server_result);
		// 70 Ah × 50 % ÷ 0.12 A ÷ 24 h = 12.15 days (arithmetic).
		expect(server.days).toBeCloseTo(12.1528, 3);
		expect(server.ranked.map((f: { fuse: string }) => f.fuse)).toEqual(['F21', 'F7']);
		const { changes } = await pullAll(tech);
		const pulled = changes.find((c) => c.entityId === t.entityId);
		expect(pulled?.entity).toBe('circuit_test');
		expect((pulled?.record as { serverResult: { verdict: string }; inputs: { fuses: unknown[] } }).serverResult.verdict).toBe('high');
		expect((pulled?.record as { inputs: { fuses: unknown[] } }).inputs.fuses).toHaveLength(2);
	});

	it('shows the lead the server’s result, the working and the phone’s differing word on the office job page', async () => {
		const lead = new Client(base, '10.9.0.2');
		expect((await lead.signIn(ws.users.lead.email, TEST_PASSWORD)).status).toBe(303);
		const html = await (await lead.get(`/jobs/${jobId}`)).text();
		expect(html).toContain('Battery, charging and circuits');
		expect(html).toContain('Charge and re-test — the battery is 50 % charged, too low to judge it.');
		expect(html).toContain('12.24 V → 50 % charged (Battery Council International rest-voltage table (flooded, 26.7 °C))');
		expect(html).toContain('The phone showed “OK”; the workshop’s own check says “Charge and re-test”.');
		expect(html).toContain('292 h ÷ 24 = 12.2 days');
	});

	it('refuses an unknown kind and inputs that are not plain figures', async () => {
		const bad = [
			create('circuit_test', { jobId, kind: 'injector', inputs: {} }),
			create('circuit_test', { jobId, kind: 'drop', inputs: { feedV: { $gt: 1 } } })
		];
		const results = await push(tech, 'phone-c', bad);
		expect(results.map((r) => r.status)).toEqual(['rejected', 'rejected']);
		expect(results.map((r) => (r as { reason?: string }).reason)).toEqual(['invalid', 'invalid']);
	});
});
