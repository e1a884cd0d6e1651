/**
 * A tiny in-memory sync server: the reference for what the real push endpoint does with a
 * batch, minus the database. Per op, in the order sent:
 *  1. an opId already in the ledger is answered `duplicate` with the first answer's fields
 *     (its status in `firstStatus`) and changes nothing;
 *  2. otherwise `mergeOp` runs against the record and its open conflicts;
 *  3. its state and conflicts are stored, a change row appended when the feed says so;
 *  4. the answer goes into the ledger (the real server leaves `server_error` out of it, so
 *     that a retry may apply; `mergeOp` never answers it).
 * Used by the property tests; the real server keeps the same steps in one transaction.
 */
import type { Change, Entity, Op, PushResult, Status } from '../../src/lib/sync/protocol';
import { mergeOp, type Conflict, type RecordState } from '../../src/lib/sync/merge';

/** A stored record: which entity, which id, its merge state. */
export type MemoryRecord = { entity: Entity; entityId: string; state: RecordState };

/**
 * The whole server state. Invariants: `ledger` holds the first answer per opId seen (never a
 * duplicate); `changes[i].seq` is `i + 1`; at most one conflict with status
 * `open` per entity, id and field.
 */
export type MemoryServer = {
	ledger: Map<string, PushResult>;
	records: Map<string, MemoryRecord>;
	conflicts: Map<string, Conflict>;
	changes: Change[];
	conflictCount: number;
};

/** One push as the server sees it once signed in: who sent it and the parsed ops. */
export type MemoryPush = { deviceId: string; userId: string; ops: readonly Op[] };

/** An empty server. */
export function createMemoryServer(): MemoryServer {
	return {
		ledger: new Map(),
		records: new Map(),
		conflicts: new Map(),
		changes: [],
		conflictCount: 0
	};
}

/** The record key: entities keep separate id spaces, as their tables do. */
export function recordKey(entity: Entity, entityId: string): string {
	return `${entity}:${entityId}`;
}

/** A deterministic UUIDv7-shaped id for the n-th conflict (so runs are reproducible). */
export function makeMemoryConflictId(n: number): string {
	return `00000000-0000-7000-8000-${n.toString(16).padStart(12, '0')}`;
}

/** The open conflicts of one record. */
export function listOpenConflicts(
	server: MemoryServer,
	entity: Entity,
	entityId: string
): Conflict[] {
	return [...server.conflicts.values()].filter(
		(c) => c.status === 'open' && c.entity === entity && c.entityId === entityId
	);
}

/** Apply one push to `server` (changed in place); answers one result per op, in order. */
export function pushToMemory(server: MemoryServer, push: MemoryPush): PushResult[] {
	return push.ops.map((op) => applyOne(server, push, op));
}

function applyOne(server: MemoryServer, push: MemoryPush, op: Op): PushResult {
	const first = server.ledger.get(op.opId);
	if (first)
		return {
			...first,
			status: 'duplicate',
			firstStatus: first.status as Exclude<Status, 'duplicate'>
		};
	const key = recordKey(op.entity, op.entityId);
	const stored = server.records.get(key);
	const outcome = mergeOp(
		stored?.state ?? null,
		{ ...op, deviceId: push.deviceId, userId: push.userId },
		{
			openConflicts: listOpenConflicts(server, op.entity, op.entityId),
			newConflictId: () => makeMemoryConflictId(++server.conflictCount)
		}
	);
	if (outcome.state)
		server.records.set(key, { entity: op.entity, entityId: op.entityId, state: outcome.state });
	for (const c of outcome.conflicts) server.conflicts.set(c.conflictId, c);
	if (outcome.feed && outcome.state) {
		server.changes.push({
			seq: server.changes.length + 1,
			entity: op.entity,
			entityId: op.entityId,
			version: outcome.state.version,
			op: outcome.feed,
			record: { id: op.entityId, version: outcome.state.version, ...outcome.state.fields }
		});
	}
	server.ledger.set(op.opId, outcome.result);
	return outcome.result;
}

/**
 * Run pushes, in order, on a fresh server (or a deep copy of `start`): pure, the inputs are
 * never changed. Returns the final server and each push's results.
 */
export function applyOpsInMemory(
	pushes: readonly MemoryPush[],
	start: MemoryServer = createMemoryServer()
): { server: MemoryServer; results: PushResult[][] } {
	const server = structuredClone(start);
	const results = pushes.map((push) => pushToMemory(server, push));
	return { server, results };
}
