/**
 * The sync pull's answer written straight to JSON text. A pull carries thousands of rows of
 * the append-only tables and of the change feed, most of whose bytes are JSON the server
 * itself stored (samples, results, feed records). Parsing that text into objects only to
 * stringify it again, and Sequelize's cast of every value on the way in, cost several times
 * the database's read (see `npm run bench:pull`). So the pull reads these rows with the
 * driver alone (`rawRows`) and writes each change as text, splicing stored JSON in as it is:
 *
 *     {"seq":…,"entity":…,"entityId":…,"version":…,"op":…,"record":{…}}
 *
 * The record of an append-only row is the very object `appendRecord` makes (same keys, same
 * order, same values), which `tests/integration/pull-json.test.ts` checks row by row
 * against it for every table.
 */
import { parseNumbers } from '../../sync/json';
import { HIDDEN_COLUMNS, JSON_COLUMNS, camel } from '../db/append-tables';
import type { RawColumn } from '../db/raw';
import type { FeedRow } from './scope';

/**
 * A change ready to send: its seq (for merging pages in order) and its JSON text as UTF-8.
 * Encoded as soon as it is written, so the page holds bytes outside the JS heap instead of
 * thousands of strings the garbage collector would copy.
 */
export type ChangeText = { seq: number; json: Buffer };

const str = (v: unknown) => (v == null ? 'null' : JSON.stringify(String(v)));
/** Any value the driver gives without a cast: text, a number, null (a bigint as its digits). */
const plain = (v: unknown) => (v == null ? 'null' : typeof v === 'string' ? JSON.stringify(v) : typeof v === 'bigint' ? v.toString() : JSON.stringify(v));
/** DATETIME text (UTC) as `Date#toJSON` writes it: `2026-12-02T16:26:02.244Z`. */
const iso = (v: unknown) => {
	if (v == null) return 'null';
	const s = String(v);
	return `"${s.slice(0, 10)}T${s.slice(11, 19)}${s.length > 19 ? `.${s.slice(20, 23).padEnd(3, '0')}` : '.000'}Z"`;
};
/**
 * Stored JSON text as it goes out: spliced in as it is, unless it holds the strings that
 * stand for ±Infinity (an OL reading): then read with `parseNumbers` and written again, as
 * the pull always did (JSON has no Infinity: it goes out as `null` beside `ol: true`).
 */
export const storedJson = (v: unknown) => (v == null ? 'null' : typeof v !== 'string' ? JSON.stringify(v) : v.includes('Infinity') ? JSON.stringify(parseNumbers(v)) : v);
const bool = (v: unknown) => (Number(v) ? 'true' : 'false');
const boolOrNull = (v: unknown) => (v == null ? 'null' : bool(v));
const num = (v: unknown) => (v == null ? 'null' : JSON.stringify(Number(v)));

const DATE_TYPES = new Set(['DATETIME', 'TIMESTAMP', 'DATETIME2', 'TIMESTAMP2']);

/** How one column is written, by its name (as `appendRecord` treats it) and its type. */
function cellOf(col: RawColumn): ((v: unknown) => string) | null {
	if (HIDDEN_COLUMNS.has(col.name)) return null;
	if (JSON_COLUMNS.has(col.name)) return storedJson;
	if (col.name === 'mismatch' || col.name === 'needs_signoff') return bool;
	if (col.name === 'range_unresolved') return boolOrNull;
	if (col.name === 'gap_mm') return num;
	if (DATE_TYPES.has(col.type)) return iso;
	if (col.type === 'DATE') return str;
	if (col.uuid) return uuid;
	return plain;
}

/** A UUID column's value (hex digits and dashes: nothing to escape). */
const uuid = (v: unknown) => (v == null ? 'null' : `"${v as string}"`);

type Writer = (row: unknown[]) => ChangeText;
const writers = new Map<string, Writer>();

/**
 * The writer of an append-only table's rows as changes (cached per entity and columns): the
 * change's envelope, then the record as `appendRecord` makes it.
 */
export function appendWriter(entity: string, columns: RawColumn[]): Writer {
	const key = `${entity}:${columns.map((c) => `${c.name}/${c.type}`).join(',')}`;
	let w = writers.get(key);
	if (w) return w;
	const seqAt = columns.findIndex((c) => c.name === 'seq');
	const idAt = columns.findIndex((c) => c.name === 'id');
	if (seqAt < 0 || idAt < 0) throw new Error(`the rows of ${entity} need their id and seq`);
	const id = columns[idAt].uuid ? uuid : plain;
	const head = `,"entity":${JSON.stringify(entity)},"entityId":`;
	const recordHead = `,"version":1,"op":"upsert","record":{"entity":${JSON.stringify(entity)}`;
	const cells = columns.flatMap((c, i) => {
		const cell = cellOf(c);
		return cell ? [{ i, prefix: `,${JSON.stringify(camel(c.name))}:`, cell }] : [];
	});
	w = (row) => {
		const seq = Number(row[seqAt]);
		let json = `{"seq":${seq}${head}${id(row[idAt])}${recordHead}`;
		for (const c of cells) json += c.prefix + c.cell(row[c.i]);
		return { seq, json: Buffer.from(`${json},"version":1}}`) };
	};
	writers.set(key, w);
	return w;
}

/** The feed's columns, in the order `feedText` reads them. */
export const FEED_COLUMNS = 'seq, entity, entity_id, version, op, job_id, audience, record';

export const feedText = (r: unknown[]): FeedRow => ({
	seq: Number(r[0]),
	entity: r[1] as string,
	entityId: r[2] as string,
	version: Number(r[3]),
	op: r[4] as FeedRow['op'],
	jobId: (r[5] as string | null) ?? null,
	audience: (r[6] as string | null) ?? null,
	record: (r[7] as string | null) ?? null
});

/** A feed row as a change (its record spliced in as stored). */
export const feedChange = (r: FeedRow): ChangeText => ({
	seq: r.seq,
	json: Buffer.from(`{"seq":${r.seq},"entity":${JSON.stringify(r.entity)},"entityId":${JSON.stringify(r.entityId)},"version":${r.version},"op":${JSON.stringify(r.op)},"record":${r.record ?? 'null'}}`)
});

/** Any change object (the mutable entities' snapshot rows) as text. */
export const objectChange = (c: { seq: number }): ChangeText => ({ seq: c.seq, json: Buffer.from(JSON.stringify(c)) });

const COMMA = Buffer.from(',');

/** A pull page's answer, `{"changes":[…], …rest}`, as UTF-8 bytes. */
export function pageJson(changes: ChangeText[], rest: Record<string, unknown> = {}): Buffer {
	let tail = ']';
	for (const [k, v] of Object.entries(rest)) if (v !== undefined) tail += `,${JSON.stringify(k)}:${JSON.stringify(v)}`;
	const parts: Buffer[] = [Buffer.from('{"changes":[')];
	for (let i = 0; i < changes.length; i++) {
		if (i) parts.push(COMMA);
		parts.push(changes[i].json);
	}
	parts.push(Buffer.from(`${tail}}`));
	return Buffer.concat(parts);
}
