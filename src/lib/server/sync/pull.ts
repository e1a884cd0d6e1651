/**
 * GET /api/sync/pull: changes after `cursor`, at most `limit`, in seq order, from the
 * change feed and the append-only tables (whose rows carry their own seq), filtered by the
 * caller's scope. The cursor moves past every row read, seen or not. A cursor ahead of the
 * feed is a 400 (the caller's copy belongs to another database).
 */
import { QueryTypes } from 'sequelize';
import type { SessionUser } from '../auth/types';
import { db } from '../db';
import { ValidationError } from '../errors';
import type { Change } from '../../sync/protocol';
import { APPEND_TABLES, appendRecord } from '../db/append-tables';
import { isLead } from '../../roles';
import { scopeOf, visible, type FeedRow } from './scope';

export async function lastSeq(workshopId: string): Promise<number> {
	const [row] = await db().query<{ last_seq: number | bigint }>('SELECT last_seq FROM change_counters WHERE workshop_id = ?', {
		replacements: [workshopId],
		type: QueryTypes.SELECT
	});
	return Number(row?.last_seq ?? 0);
}

async function readFeed(workshopId: string, cursor: number, limit: number): Promise<FeedRow[]> {
	const rows = await db().query<Record<string, unknown>>(
		'SELECT seq, entity, entity_id, version, op, job_id, audience, record FROM changes WHERE workshop_id = ? AND seq > ? ORDER BY seq LIMIT ?',
		{ replacements: [workshopId, cursor, limit], type: QueryTypes.SELECT }
	);
	const feed: FeedRow[] = rows.map((r) => ({
		seq: Number(r.seq),
		entity: r.entity as string,
		entityId: r.entity_id as string,
		version: r.version as number,
		op: r.op as FeedRow['op'],
		jobId: r.job_id as string | null,
		audience: r.audience as string | null,
		record: r.record ? JSON.parse(r.record as string) : null
	}));
	for (const [entity, table] of Object.entries(APPEND_TABLES)) {
		const more = await db().query<Record<string, unknown>>(`SELECT * FROM ${table} WHERE workshop_id = ? AND seq > ? ORDER BY seq LIMIT ?`, {
			replacements: [workshopId, cursor, limit],
			type: QueryTypes.SELECT
		});
		for (const r of more) {
			feed.push({ seq: Number(r.seq), entity, entityId: r.id as string, version: 1, op: 'upsert', jobId: r.job_id as string, audience: null, record: appendRecord(entity, r) });
		}
	}
	return feed.sort((a, b) => a.seq - b.seq);
}

export async function pullChanges(user: SessionUser, cursor: number, limit: number) {
	const last = await lastSeq(user.workshopId);
	if (cursor > last) throw new ValidationError({ cursor: `Ahead of the feed (last is ${last})` }, 'Cursor ahead of the feed');
	const read = await readFeed(user.workshopId, cursor, limit);
	const page = read.slice(0, limit);
	const scope = isLead(user) ? null : await scopeOf(user);
	const changes: Change[] = page
		.filter((r) => visible(r, user, scope))
		.map((r) => ({ seq: r.seq, entity: r.entity as Change['entity'], entityId: r.entityId, version: r.version, op: r.op, record: r.record }));
	const next = page.length ? page[page.length - 1].seq : cursor;
	return { changes, cursor: next, more: next < last };
}
