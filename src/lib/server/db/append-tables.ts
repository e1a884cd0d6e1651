/**
 * Tables of the append-only entities (each row carries its op id and feed seq), and how a
 * row becomes the record the pull sends.
 */
import { parseNumbers } from '../../sync/json';

export const APPEND_TABLES = {
	reading: 'readings',
	spark_test: 'spark_tests',
	swap_test: 'swap_tests',
	signoff: 'signoffs',
	photo: 'photos',
	photo_mark: 'photo_marks',
	circuit_test: 'circuit_tests'
} as const;
export type StoredAppendEntity = keyof typeof APPEND_TABLES;
export type AppendTable = (typeof APPEND_TABLES)[StoredAppendEntity];

/** `items` grouped by their table (items with none are left out), each group in order. */
export function groupByTable<T, V>(
	items: Iterable<T>,
	tableOf: (item: T) => AppendTable | undefined,
	value: (item: T) => V
): Map<AppendTable, V[]> {
	const groups = new Map<AppendTable, V[]>();
	for (const item of items) {
		const table = tableOf(item);
		if (!table) continue;
		const list = groups.get(table);
		if (list) list.push(value(item));
		else groups.set(table, [value(item)]);
	}
	return groups;
}

/** Names spelled as the mutable records spell them (a test's `needsSignOff`). */
const camelCache = new Map<string, string>([['needs_signoff', 'needsSignOff']]);
/** A column's name as the record's key: `server_result` → `serverResult`. */
export const camel = (s: string) => {
	let c = camelCache.get(s);
	if (c === undefined) camelCache.set(s, (c = s.replace(/_([a-z])/g, (_m, x: string) => x.toUpperCase())));
	return c;
};
/** Columns holding JSON text. */
export const JSON_COLUMNS = new Set(['samples', 'visual', 'device_result', 'server_result', 'before_counts', 'after_counts', 'inputs']);
/**
 * Tables whose rows keep the change the pull sends, as JSON after its seq in UTF-8 bytes (a
 * STORED generated column, `migrations/2026-12-02T16-40-reading-record.ts`): readings, the
 * table that grows. NULL where the pull must write the record itself (an OL reading's ±Infinity).
 */
export const STORED_CHANGE: Partial<Record<AppendTable, string>> = { readings: 'record_json' };
/** Never sent: the workshop, feed bookkeeping, where a photo's bytes are stored, and the stored change itself. */
export const HIDDEN_COLUMNS = new Set(['workshop_id', 'op_id', 'seq', 'object_key', 'thumb_key', 'purged_at', ...Object.values(STORED_CHANGE)]);
/** JSON text as the record carries it (the reviver, for ±Infinity, only when the text holds one). */
const json = (v: string) => (v.includes('Infinity') ? parseNumbers(v) : JSON.parse(v));

/** The public record of an append-only row, as the pull sends it (camelCase, parsed JSON). */
export function appendRecord(entity: string, row: Record<string, unknown>): Record<string, unknown> {
	const out: Record<string, unknown> = { entity };
	for (const k in row) {
		if (HIDDEN_COLUMNS.has(k)) continue;
		const v = row[k];
		out[camel(k)] =
			JSON_COLUMNS.has(k) && typeof v === 'string'
				? json(v)
				: k === 'mismatch' || k === 'needs_signoff'
					? Boolean(v)
					: k === 'range_unresolved'
						? v == null
							? null
							: Boolean(v)
						: k === 'gap_mm'
							? Number(v)
							: v;
	}
	out.version = 1;
	return out;
}
