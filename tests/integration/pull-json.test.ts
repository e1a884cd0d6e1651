/**
 * The pull's answer written as text (`src/lib/server/sync/pull-json.ts`: rows read with the
 * driver alone, stored JSON spliced in as it is) against the objects the pull made before
 * (`appendRecord` over Sequelize's rows, then `JSON.stringify`): for every append-only table,
 * rows whose columns take awkward values in turn — quotes, backslashes, line breaks, control
 * characters, letters outside ASCII, ±Infinity inside stored JSON, nulls, decimals, dates —
 * must give the same changes, read directly, through the pull (snapshot and feed) and through
 * a job fetched on demand; compressed on the way when the phone takes it. The rows are made from the tables' own column lists, so a column
 * added later is covered too.
 */
import http from 'node:http';
import zlib from 'node:zlib';
import { QueryTypes } from 'sequelize';
import { v7 as uuidv7 } from 'uuid';
import { beforeAll, describe, expect, inject, it } from 'vitest';
import { db } from '../../src/lib/server/db';
import { APPEND_TABLES, JSON_COLUMNS, appendRecord } from '../../src/lib/server/db/append-tables';
import { rawRows } from '../../src/lib/server/db/raw';
import { jobs } from '../../src/lib/server/services/jobs';
import { tests as testRecords } from '../../src/lib/server/services/tests';
import { lastSeq } from '../../src/lib/server/sync/pull';
import { Bytes, appendWriter, changeJson, objectChange, pageJson } from '../../src/lib/server/sync/pull-json';
import { stringifyNumbers } from '../../src/lib/sync/json';
import { makeWorkshop, TEST_PASSWORD } from '../helpers/fixtures';
import { Client } from '../helpers/http';

const base = inject('baseURL');

/** Text a field might hold: quotes, a backslash, a line break, a tab, a control character, a closing script tag, letters outside ASCII. */
const AWKWARD = 'Bay "3" \\ left\nsecond line\tTab \u0001 </script> é Ω µs 🔧';
const JSON_VARIANTS = [
	JSON.stringify({ note: AWKWARD, list: [1, 2.5, -0.000123, 1e21, 0], nested: { empty: [], flag: false } }),
	// An OL reading: ±Infinity written as strings (`stringifyNumbers`); the pull sends null.
	stringifyNumbers({ value: Infinity, ol: true, bands: [{ min: -Infinity, max: 0.6 }], word: 'Infinity' })
];

type Column = { name: string; dataType: string; columnType: string; length: number | null; nullable: boolean };

/** A value for one column in variant 0 (nullable columns empty), 1 or 2. */
function valueOf(c: Column, v: number, ids: { workshop: string; job: string; test: string; user: string }, seq: number): unknown {
	if (c.name === 'id' || c.name === 'op_id') return uuidv7();
	if (c.name === 'workshop_id') return ids.workshop;
	if (c.name === 'job_id') return ids.job;
	if (c.name === 'seq') return seq;
	if (v === 0 && c.nullable) return null;
	if (c.name === 'created_by') return ids.user;
	if (c.name === 'test_id') return ids.test; // a real test: other suites check every reading has one
	if (JSON_COLUMNS.has(c.name)) return JSON_VARIANTS[v % 2];
	switch (c.dataType) {
		case 'uuid':
			return uuidv7();
		case 'enum': {
			const options = [...c.columnType.matchAll(/'([^']*)'/g)].map((m) => m[1]);
			return options[v % options.length];
		}
		case 'tinyint':
			return v % 2;
		case 'int':
		case 'smallint':
		case 'bigint':
			return 40 + v;
		case 'decimal':
			return ['0.50', '123.45', '-1.05'][v];
		case 'datetime':
		case 'timestamp':
			return ['2026-01-02 03:04:05.678', '2026-12-31 23:59:59.000', '2025-06-30 12:00:00.500'][v];
		case 'date':
			return '2026-03-04';
		case 'double':
		case 'float':
			return 1.5 + v;
		default: {
			// Text, cut to the column's length in characters.
			const chars = Array.from(v === 1 ? AWKWARD : `${AWKWARD} ${'x'.repeat(300)}`);
			return chars.slice(0, c.length ?? chars.length).join('');
		}
	}
}

async function columnsOf(table: string): Promise<Column[]> {
	const rows = await db().query<{ n: string; d: string; t: string; l: number | null; nul: string }>(
		`SELECT COLUMN_NAME AS n, DATA_TYPE AS d, COLUMN_TYPE AS t, CHARACTER_MAXIMUM_LENGTH AS l, IS_NULLABLE AS nul
		 FROM information_schema.COLUMNS WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = ? AND EXTRA NOT LIKE '%GENERATED%' ORDER BY ORDINAL_POSITION`,
		{ replacements: [table], type: QueryTypes.SELECT }
	);
	return rows.map((r) => ({ name: r.n, dataType: r.d, columnType: r.t, length: r.l == null ? null : Number(r.l), nullable: r.nul === 'YES' }));
}

/** The change as the pull wrote it before: Sequelize's row → `appendRecord` → JSON. */
const reference = (entity: string, row: Record<string, unknown>) =>
	JSON.parse(JSON.stringify({ seq: Number(row.seq), entity, entityId: row.id, version: 1, op: 'upsert', record: appendRecord(entity, row) }));

type Change = { seq: number; entity: string; entityId: string; record: Record<string, unknown> | null };

describe('the pull written as text', () => {
	let w: Awaited<ReturnType<typeof makeWorkshop>>;
	let jobId: string;
	let before: number;
	const expected = new Map<string, unknown>(); // entity id → the reference change
	let lead: Client;

	beforeAll(async () => {
		w = await makeWorkshop('Pull text');
		jobId = (await jobs.create(w.users.lead.actor, { complaint: 'Charge light stays on', assigneeId: w.users.technician.id })).id as string;
		before = await lastSeq(w.workshop.id);
		const testId = (await testRecords.create(w.users.lead.actor, { jobId })).id as string;
		const ids = { workshop: w.workshop.id, job: jobId, test: testId, user: w.users.technician.id };
		for (const table of Object.values(APPEND_TABLES)) {
			const cols = await columnsOf(table);
			for (let v = 0; v < 3; v++) {
				await db().query('UPDATE change_counters SET last_seq = last_seq + 1 WHERE workshop_id = ?', { replacements: [w.workshop.id] });
				const seq = await lastSeq(w.workshop.id);
				const values = cols.map((c) => valueOf(c, v, ids, seq));
				await db().query(`INSERT INTO ${table} (${cols.map((c) => c.name).join(', ')}) VALUES (${cols.map(() => '?').join(', ')})`, { replacements: values });
			}
		}
		for (const [entity, table] of Object.entries(APPEND_TABLES)) {
			const rows = await db().query<Record<string, unknown>>(`SELECT * FROM ${table} WHERE job_id = ? ORDER BY seq`, { replacements: [jobId], type: QueryTypes.SELECT });
			expect(rows).toHaveLength(3);
			for (const row of rows) expected.set(row.id as string, reference(entity, row));
		}
		lead = new Client(base, '10.31.0.1');
		expect((await lead.signIn(w.users.lead.email, TEST_PASSWORD)).status).toBe(303);
	});

	it('writes every append-only row as the record the pull made before, for every table', async () => {
		for (const [entity, table] of Object.entries(APPEND_TABLES)) {
			const { rows, columns } = await rawRows(`SELECT * FROM ${table} WHERE job_id = ? ORDER BY seq`, [jobId]);
			const out = new Bytes(256); // small, so it grows while written
			const write = appendWriter(entity, columns);
			const written = rows.map((r) => JSON.parse(changeJson(write(r, out))));
			expect(written).toHaveLength(3);
			for (const change of written) expect(change, `${entity} seq ${change.seq}`).toEqual(expected.get(change.entityId));
		}
		// The awkward text came through whole, and an OL value went out as null (JSON has no Infinity).
		const whole = [...expected.values()].filter((c) => Object.values((c as Change).record ?? {}).includes(AWKWARD));
		expect(whole.map((c) => (c as Change).entity)).toEqual(expect.arrayContaining(['signoff', 'spark_test', 'circuit_test']));
		const ol = [...expected.values()].find((c) => (c as Change).entity === 'reading' && ((c as Change).record?.samples as { ol?: boolean } | null)?.ol === true);
		expect((ol as Change).record?.samples).toEqual({ value: null, ol: true, bands: [{ min: null, max: 0.6 }], word: null });
	});

	it("keeps each reading's change as the pull sends it, written by the database (none for an OL reading)", async () => {
		// The rows above (awkward text, nulls, an OL reading), and two more with every flag set.
		const job = (await jobs.create(w.users.lead.actor, { complaint: 'Misfire under load', assigneeId: w.users.technician.id })).id as string;
		const test = (await testRecords.create(w.users.lead.actor, { jobId: job })).id as string;
		const cols = await columnsOf('readings');
		for (const v of [0, 2]) {
			await db().query('UPDATE change_counters SET last_seq = last_seq + 1 WHERE workshop_id = ?', { replacements: [w.workshop.id] });
			const seq = await lastSeq(w.workshop.id);
			const values = cols.map((c) => (c.dataType === 'tinyint' ? 1 : valueOf(c, v, { workshop: w.workshop.id, job, test, user: w.users.lead.id }, seq)));
			await db().query(`INSERT INTO readings (${cols.map((c) => c.name).join(', ')}) VALUES (${cols.map(() => '?').join(', ')})`, { replacements: values });
		}
		const rows = await db().query<Record<string, unknown>>('SELECT * FROM readings WHERE job_id IN (?, ?) ORDER BY seq', { replacements: [jobId, job], type: QueryTypes.SELECT });
		expect(rows).toHaveLength(5);
		for (const row of rows) {
			const want = reference('reading', row);
			if (row.samples && String(row.samples).includes('Infinity')) {
				expect(row.record_json, 'an OL reading is written by the pull').toBeNull();
				continue;
			}
			expect(row.record_json).toBeInstanceOf(Buffer); // UTF-8 bytes, copied as they are
			expect(JSON.parse(`{"seq":${row.seq}${row.record_json}`), `reading seq ${row.seq}`).toEqual(want);
		}
		// Both flags came through as true, and empty ones as null.
		const flags = rows.map((r) => JSON.parse(`{"seq":0${r.record_json ?? ',"record":{}}'}`).record).map((r) => [r.mismatch, r.rangeUnresolved]);
		expect(flags).toEqual(expect.arrayContaining([[true, true], [false, null]]));
	});

	it('sends the same changes through the snapshot, the feed and a job fetched on demand', async () => {
		const mine = (changes: Change[]) => changes.filter((c) => expected.has(c.entityId));
		const pages = async (cursor: number, limit: number) => {
			const all: Change[] = [];
			let snapshot: string | undefined;
			for (let i = 0; i < 200; i++) {
				const r = await lead.get(`/api/sync/pull?v=2&cursor=${cursor}&limit=${limit}${snapshot ? `&snapshot=${snapshot}` : ''}`);
				expect(r.status).toBe(200);
				expect(r.headers.get('content-type')).toMatch(/^application\/json/);
				expect(r.headers.get('server-timing')).toMatch(/^handler;dur=\d+(\.\d)?$/);
				const page = (await r.json()) as { changes: Change[]; cursor: number; more: boolean; snapshot?: string };
				all.push(...page.changes);
				cursor = page.cursor;
				snapshot = page.snapshot;
				if (!page.more) return all;
			}
			throw new Error('the pull did not end');
		};
		const count = Object.keys(APPEND_TABLES).length * 3;
		// Small pages, so a page ends inside a table and between tables.
		for (const [label, changes] of [
			['snapshot', await pages(0, 4)],
			['feed', await pages(before, 4)],
			['on demand', ((await (await lead.get(`/api/sync/jobs/${jobId}`)).json()) as { changes: Change[] }).changes]
		] as const) {
			const got = mine(changes);
			expect(got, label).toHaveLength(count);
			for (const c of got) expect(c, `${label}: ${c.entity}`).toEqual(expected.get(c.entityId));
		}
	});

	it('splices a job record from the feed as it was stored', async () => {
		const job = await jobs.create(w.users.lead.actor, { complaint: AWKWARD, assigneeId: w.users.technician.id });
		const r = await lead.get(`/api/sync/pull?cursor=${before}&limit=1000`);
		const page = (await r.json()) as { changes: Change[] };
		const change = page.changes.find((c) => c.entityId === job.id && c.entity === 'job');
		const [stored] = await db().query<{ record: string }>("SELECT record FROM changes WHERE workshop_id = ? AND entity = 'job' AND entity_id = ? ORDER BY seq DESC LIMIT 1", {
			replacements: [w.workshop.id, job.id],
			type: QueryTypes.SELECT
		});
		expect(change?.record).toEqual(JSON.parse(stored.record));
		expect(change?.record?.complaint).toBe(AWKWARD);
	});

	it('sends a page compressed when the phone takes it (brotli, else gzip), the same JSON inside', async () => {
		const path = `/api/sync/pull?v=2&cursor=${before}&limit=1000`;
		const raw = (encoding: string) =>
			new Promise<{ body: Buffer; encoding: string | undefined }>((resolve, reject) => {
				http
					.get(base + path, { headers: lead.headers({ accept: 'application/json', 'accept-encoding': encoding }) }, (res) => {
						const chunks: Buffer[] = [];
						res.on('data', (d: Buffer) => chunks.push(d));
						res.on('end', () => resolve({ body: Buffer.concat(chunks), encoding: res.headers['content-encoding'] }));
					})
					.on('error', reject);
			});
		const plain = await raw('identity');
		expect(plain.encoding).toBeUndefined();
		const expected = JSON.parse(plain.body.toString('utf8'));
		expect(expected.changes.length).toBeGreaterThan(20);
		const br = await raw('gzip, deflate, br');
		expect(br.encoding).toBe('br');
		expect(br.body.length).toBeLessThan(plain.body.length / 3);
		expect(JSON.parse(zlib.brotliDecompressSync(br.body).toString('utf8'))).toEqual(expected);
		const gz = await raw('gzip');
		expect(gz.encoding).toBe('gzip');
		expect(JSON.parse(zlib.gunzipSync(gz.body).toString('utf8'))).toEqual(expected);
	});

	it('writes a page as one JSON object with the rest of the answer after the changes', () => {
		const out = new Bytes(256);
		const body = pageJson(
			[objectChange({ seq: 1, note: 'Ω' }, out), objectChange({ seq: 2 }, out)],
			{ cursor: 2, more: false, snapshot: undefined, keep: ['a'] }
		);
		expect(JSON.parse(body.toString('utf8'))).toEqual({ changes: [{ seq: 1, note: 'Ω' }, { seq: 2 }], cursor: 2, more: false, keep: ['a'] });
		expect(JSON.parse(pageJson([]).toString('utf8'))).toEqual({ changes: [] });
	});

	it('writes text as JSON.stringify does, however long and whatever it holds, while its buffer grows', () => {
		const out = new Bytes(256);
		const texts = ['', 'plain', AWKWARD, 'x'.repeat(5000), `${'y'.repeat(300)}"`, '\u007f del', '\u2028 line sep', 'é'.repeat(400)];
		const spans = texts.map((t) => {
			const start = out.at;
			out.text(t);
			return [start, out.at] as const;
		});
		expect(out.buf.length).toBeGreaterThan(256);
		spans.forEach(([start, end], i) => expect(out.buf.toString('utf8', start, end), `text ${i}`).toBe(JSON.stringify(texts[i])));
	});
});
