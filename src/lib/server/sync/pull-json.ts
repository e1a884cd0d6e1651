/**
 * The sync pull's answer written straight to JSON bytes. A pull carries thousands of rows of
 * the append-only tables and of the change feed, most of whose bytes are JSON the server
 * itself stored (samples, results, feed records). Parsing that text into objects only to
 * stringify it again, and Sequelize's cast of every value on the way in, cost several times
 * the database's read (see `npm run bench:pull`). So the pull reads these rows with the
 * driver alone (`rawRows`) and writes each change as UTF-8 into one growing buffer per source
 * (`Bytes`), splicing stored JSON in as it is:
 *
 *     {"seq":…,"entity":…,"entityId":…,"version":…,"op":…,"record":{…}}
 *
 * Writing bytes, not strings: a string a change, built of some forty pieces, had to be
 * flattened and encoded, and the garbage collector then copied them all; together that cost
 * more than the database's read. Known-ASCII pieces (keys, UUIDs, digits, dates) are copied a
 * character at a time; text the driver gives is encoded by node in one call.
 *
 * The record of an append-only row is the very object `appendRecord` makes (same keys, same
 * values), which `tests/integration/pull-json.test.ts` checks row by row against it for
 * every table.
 *
 * Readings, the table that grows, are not written here at all: each row keeps its change as
 * text the database wrote once (`readings.record_json`, `STORED_CHANGE`), which the pull
 * copies behind its seq (`storedChange`); only an OL reading, whose text is NULL, comes
 * through the writer below.
 */
import { parseNumbers } from '../../sync/json';
import { HIDDEN_COLUMNS, JSON_COLUMNS, camel } from '../db/append-tables';
import type { RawColumn } from '../db/raw';
import type { FeedRow } from './scope';

/** UTF-8 written one piece after another into a buffer that grows as needed. */
export class Bytes {
	buf: Buffer;
	at = 0;
	constructor(size = 64 * 1024) {
		this.buf = Buffer.allocUnsafe(Math.max(256, size));
	}
	/** Room for `n` more bytes. */
	room(n: number): void {
		if (this.at + n <= this.buf.length) return;
		const bigger = Buffer.allocUnsafe(Math.max(this.buf.length * 2, this.at + n));
		this.buf.copy(bigger, 0, 0, this.at);
		this.buf = bigger;
	}
	/** Text known to be ASCII with nothing to escape (keys, digits, UUIDs), after `room`. */
	ascii(s: string): void {
		const b = this.buf;
		let at = this.at;
		for (let i = 0; i < s.length; i++) b[at++] = s.charCodeAt(i);
		this.at = at;
	}
	/** Any text, as it is (stored JSON). */
	utf8(s: string): void {
		this.room(s.length * 3);
		this.at += this.buf.write(s, this.at, 'utf8');
	}
	/** Any text as a JSON string: plain ASCII copied between quotes, anything else through `JSON.stringify`. */
	text(s: string): void {
		this.room(s.length + 2);
		const b = this.buf;
		let at = this.at;
		b[at++] = 0x22;
		for (let i = 0; i < s.length; i++) {
			const c = s.charCodeAt(i);
			if (c < 0x20 || c > 0x7e || c === 0x22 || c === 0x5c) return this.utf8(JSON.stringify(s));
			b[at++] = c;
		}
		b[at++] = 0x22;
		this.at = at;
	}
}

/**
 * A change ready to send: its seq (for merging pages in order) and where its JSON lies in
 * `bytes` (`start` to `end`; read through `bytes`, whose buffer may have grown since).
 */
export type ChangeText = { seq: number; bytes: Bytes; start: number; end: number };

/** A change's JSON as text (tests, and the odd caller that wants one). */
export const changeJson = (c: ChangeText) => c.bytes.buf.toString('utf8', c.start, c.end);

/**
 * Stored JSON text as it goes out: spliced in as it is, unless it holds the strings that
 * stand for ±Infinity (an OL reading): then read with `parseNumbers` and written again, as
 * the pull always did (JSON has no Infinity: it goes out as `null` beside `ol: true`).
 */
const storedJson = (v: unknown) => (v == null ? 'null' : typeof v !== 'string' ? JSON.stringify(v) : v.includes('Infinity') ? JSON.stringify(parseNumbers(v)) : v);

/** DATETIME text (UTC, `2026-12-02 16:26:02.244`) as `Date#toJSON` writes it: `2026-12-02T16:26:02.244Z`. */
function iso(s: string, out: Bytes): void {
	const b = out.buf;
	let at = out.at;
	b[at++] = 0x22;
	for (let i = 0; i < 19; i++) b[at++] = i === 10 ? 0x54 : s.charCodeAt(i); // 'T' between date and time
	b[at++] = 0x2e; // '.', then the milliseconds: three digits, zeros when there are fewer
	for (let i = 20; i < 23; i++) b[at++] = i < s.length ? s.charCodeAt(i) : 0x30;
	b[at++] = 0x5a; // 'Z'
	b[at++] = 0x22;
	out.at = at;
}

const DATE_TYPES = new Set(['DATETIME', 'TIMESTAMP', 'DATETIME2', 'TIMESTAMP2']);

/** How a column is written (one `switch` in the writer: a call through a table of functions cost a third more). */
const enum Kind {
	Stored,
	Bool,
	BoolOrNull,
	Num,
	Iso,
	Str,
	Uuid,
	Plain
}

/** How one column is written, by its name (as `appendRecord` treats it) and its type; null: never sent. */
function kindOf(col: RawColumn): Kind | null {
	if (HIDDEN_COLUMNS.has(col.name)) return null;
	if (JSON_COLUMNS.has(col.name)) return Kind.Stored;
	if (col.name === 'mismatch' || col.name === 'needs_signoff') return Kind.Bool;
	if (col.name === 'range_unresolved') return Kind.BoolOrNull;
	if (col.name === 'gap_mm') return Kind.Num;
	if (DATE_TYPES.has(col.type)) return Kind.Iso;
	if (col.type === 'DATE') return Kind.Str;
	if (col.uuid) return Kind.Uuid;
	return Kind.Plain;
}

/** Room for a cell's key and any value a fixed-size cell writes (a UUID, a date, a number); text makes its own. */
const CELL_ROOM = 64;

type Writer = (row: unknown[], out: Bytes) => ChangeText;
const writers = new Map<string, Writer>();

/**
 * The writer of an append-only table's rows as changes into `out` (cached per entity and
 * columns): the change's envelope, then the record as `appendRecord` makes it.
 */
export function appendWriter(entity: string, columns: RawColumn[]): Writer {
	const key = `${entity}:${columns.map((c) => `${c.name}/${c.type}/${c.uuid}`).join(',')}`;
	let w = writers.get(key);
	if (w) return w;
	const seqAt = columns.findIndex((c) => c.name === 'seq');
	const idAt = columns.findIndex((c) => c.name === 'id');
	if (seqAt < 0 || idAt < 0) throw new Error(`the rows of ${entity} need their id and seq`);
	const idKind = columns[idAt].uuid ? Kind.Uuid : Kind.Plain;
	const head = `,"entity":${JSON.stringify(entity)},"entityId":`;
	const recordHead = `,"version":1,"op":"upsert","record":{"entity":${JSON.stringify(entity)}`;
	const at: number[] = [];
	const kinds: Kind[] = [];
	const prefixes: string[] = [];
	columns.forEach((c, i) => {
		const kind = kindOf(c);
		if (kind === null) return;
		at.push(i);
		kinds.push(kind);
		prefixes.push(`,${JSON.stringify(camel(c.name))}:`);
	});
	w = (row, out) => {
		const seq = Number(row[seqAt]);
		const start = out.at;
		out.room(recordHead.length + head.length + 2 * CELL_ROOM);
		out.ascii('{"seq":');
		out.ascii(String(seq));
		out.ascii(head);
		cell(idKind, row[idAt], out);
		out.ascii(recordHead);
		for (let k = 0; k < kinds.length; k++) {
			out.room(prefixes[k].length + CELL_ROOM);
			out.ascii(prefixes[k]);
			cell(kinds[k], row[at[k]], out);
		}
		out.room(16);
		out.ascii(',"version":1}}');
		return { seq, bytes: out, start, end: out.at };
	};
	writers.set(key, w);
	return w;
}

/** One value as its kind writes it (after `room` for CELL_ROOM; text makes its own room). */
function cell(kind: Kind, v: unknown, out: Bytes): void {
	if (v == null) return out.ascii('null');
	switch (kind) {
		case Kind.Stored:
			return out.utf8(storedJson(v));
		case Kind.Bool:
		case Kind.BoolOrNull:
			return out.ascii(Number(v) ? 'true' : 'false');
		case Kind.Num:
			return out.ascii(JSON.stringify(Number(v)));
		case Kind.Iso:
			return iso(String(v), out);
		case Kind.Str:
			return out.text(String(v));
		case Kind.Uuid: {
			const b = out.buf;
			const s = v as string;
			let at = out.at;
			b[at++] = 0x22;
			for (let i = 0; i < s.length; i++) b[at++] = s.charCodeAt(i);
			b[at++] = 0x22;
			out.at = at;
			return;
		}
		default:
			if (typeof v === 'string') return out.text(v);
			if (typeof v === 'bigint') return out.ascii(v.toString());
			return out.utf8(JSON.stringify(v));
	}
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

/** A feed row as a change into `out` (its record spliced in as stored). */
export function feedChange(r: FeedRow, out: Bytes): ChangeText {
	const start = out.at;
	out.room(64);
	out.ascii(`{"seq":${r.seq},"entity":`);
	out.text(r.entity);
	out.room(16);
	out.ascii(',"entityId":');
	out.text(r.entityId);
	out.room(64);
	out.ascii(`,"version":${r.version},"op":`);
	out.text(r.op);
	out.room(16);
	out.ascii(',"record":');
	out.utf8(r.record ?? 'null');
	out.room(1);
	out.ascii('}');
	return { seq: r.seq, bytes: out, start, end: out.at };
}

/** A change kept as text after its seq (`STORED_CHANGE`: `,"entity":…}`) into `out`, its seq in front. */
export function storedChange(seq: number, rest: Buffer, out: Bytes): ChangeText {
	const start = out.at;
	out.room(24 + rest.length);
	out.ascii('{"seq":');
	out.ascii(String(seq));
	out.at += rest.copy(out.buf, out.at);
	return { seq, bytes: out, start, end: out.at };
}

/** Any change object (the mutable entities' snapshot rows) as JSON into `out`. */
export function objectChange(c: { seq: number; [key: string]: unknown }, out: Bytes): ChangeText {
	const start = out.at;
	out.utf8(JSON.stringify(c));
	return { seq: c.seq, bytes: out, start, end: out.at };
}

/** A pull page's answer, `{"changes":[…], …rest}`, as UTF-8 bytes: one buffer, each change copied in once. */
export function pageJson(changes: ChangeText[], rest: Record<string, unknown> = {}): Buffer {
	let tail = ']';
	for (const [k, v] of Object.entries(rest)) if (v !== undefined) tail += `,${JSON.stringify(k)}:${JSON.stringify(v)}`;
	tail += '}';
	const head = '{"changes":[';
	let size = head.length + changes.length + Buffer.byteLength(tail);
	for (const c of changes) size += c.end - c.start;
	const out = Buffer.allocUnsafe(size);
	let at = out.write(head, 0, 'latin1');
	for (let i = 0; i < changes.length; i++) {
		if (i) out[at++] = 0x2c; // ,
		const c = changes[i];
		at += c.bytes.buf.copy(out, at, c.start, c.end);
	}
	at += out.write(tail, at, 'utf8');
	return out.subarray(0, at);
}
