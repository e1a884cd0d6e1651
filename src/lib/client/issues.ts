/**
 * What needs attention on the phone: ops the server refused (a rule of the workshop, a
 * record gone, fields it did not accept) and clashes kept for the lead. A refusal never
 * holds up the rest of the outbox; the technician reads why and discards it here, which also
 * takes its effect off this phone's copy.
 */
import type { Issue, LocalDb } from './local-db';

/** Everything that needs attention, oldest first. */
export async function listIssues(db: LocalDb): Promise<Issue[]> {
	return (await db.getAll('issues')).sort((a, b) => a.at.localeCompare(b.at));
}

/**
 * Discard one issue. For a refused op, undo it on this phone: a refused new record goes
 * (with the ops still waiting for it, which could only be refused too), a refused change
 * puts back the values the fields had before it, a refused removal brings the record back.
 * A clash only leaves the list: the lead settles it, and the next pull brings the outcome.
 */
export async function discardIssue(db: LocalDb, opId: string): Promise<void> {
	const tx = db.transaction(['issues', 'records', 'outbox'], 'readwrite');
	const issues = tx.objectStore('issues');
	const issue = await issues.get(opId);
	if (!issue) return tx.done;
	await issues.delete(opId);
	if (issue.kind === 'rejected') {
		const { op } = issue;
		const records = tx.objectStore('records');
		const key: [string, string] = [op.entity, op.entityId];
		const rec = await records.get(key);
		if (op.kind === 'create') {
			await records.delete(key);
			const outbox = tx.objectStore('outbox');
			for (let c = await outbox.openCursor(); c; c = await c.continue()) {
				if (c.value.op.entity === op.entity && c.value.op.entityId === op.entityId) await c.delete();
			}
		} else if (rec && op.kind === 'patch' && issue.before) {
			// A later change of the same field, still waiting to send, stays on top.
			const later = new Set<string>();
			for (const e of await tx.objectStore('outbox').getAll())
				if (e.op.entity === op.entity && e.op.entityId === op.entityId) Object.keys(e.op.fields).forEach((k) => later.add(k));
			const undo = Object.entries(issue.before).filter(([k]) => !later.has(k));
			await records.put({ ...rec, data: { ...rec.data, ...Object.fromEntries(undo) } });
		} else if (rec && op.kind === 'delete') {
			await records.put({ ...rec, deleted: false });
		}
	}
	await tx.done;
}
