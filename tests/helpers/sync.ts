/** Builders for sync ops in tests. */
import { v7 as uuidv7 } from 'uuid';
import type { Client } from './http';

export type TestOp = {
	opId: string;
	entity: string;
	entityId: string;
	kind: 'create' | 'patch' | 'delete';
	baseVersion: number;
	fields: Record<string, unknown>;
	deviceTime: string;
};

export const op = (entity: string, kind: TestOp['kind'], entityId: string, fields: Record<string, unknown> = {}, baseVersion = 0): TestOp => ({
	opId: uuidv7(),
	entity,
	entityId,
	kind,
	baseVersion,
	fields,
	deviceTime: new Date().toISOString()
});

export const create = (entity: string, fields: Record<string, unknown>, id = uuidv7()) => op(entity, 'create', id, fields, 0);

export async function push(c: Client, deviceId: string, ops: TestOp[]) {
	const r = await c.json('POST', '/api/sync/push', { deviceId, ops });
	const body = await r.json();
	if (r.status !== 200) throw new Error(`push ${r.status}: ${JSON.stringify(body)}`);
	return body.results as { opId: string; status: string; version?: number; reason?: string; conflictId?: string; firstStatus?: string }[];
}

/** Pull everything from `cursor` in pages of `limit`. */
export async function pullAll(c: Client, cursor = 0, limit = 50) {
	const changes: { seq: number; entity: string; entityId: string; op: string; version: number; record: Record<string, unknown> | null }[] = [];
	for (let i = 0; i < 1000; i++) {
		const r = await c.get(`/api/sync/pull?cursor=${cursor}&limit=${limit}`);
		const page = await r.json();
		if (r.status !== 200) throw new Error(`pull ${r.status}: ${JSON.stringify(page)}`);
		changes.push(...page.changes);
		cursor = page.cursor;
		if (!page.more) break;
	}
	return { changes, cursor };
}
