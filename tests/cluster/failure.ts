/**
 * `npm run test:cluster` (not part of `npm test`; about 3 minutes on 2 cores plus the
 * cluster's start): phones push readings through the load balancer while the writing
 * database node and one app server are killed (SIGKILL) and brought back.
 *
 *  1. The cluster up (`npm run cluster:start`'s steps; reused when it runs): 3 Galera nodes,
 *     2 app servers, HAProxy.
 *  2. Through the services: an invented workshop, a lead, one technician per phone with a job,
 *     an approved two-check sheet and four tests per job.
 *  3. The phones sign in through the balancer and push readings in batches of BATCH, each
 *     batch sent again after any failure (no answer, 5xx, 429) exactly as the phone's sync
 *     client does, until the schedule ends: writer node killed → app 1 killed → app 1 back →
 *     the node back.
 *  4. Checks: every reading a phone made is stored exactly once; every answer was applied or
 *     duplicate; the workshop's feed (changes + append-only tables) numbers 1…last with no
 *     gap and no repeat; a lead's pull through the balancer returns every reading once; the
 *     cluster is whole again (wsrep_cluster_size 3 on every node) and every node holds the
 *     same row counts.
 * Prints one summary line and exits 1 on any failure.
 */
import {
	clusterSize,
	NODES,
	nodeSql,
	nodeSynced,
	startApp,
	startCluster,
	startNode,
	stopApp,
	stopNode
} from '../../scripts/lib/cluster';
import { Client } from '../helpers/http';
import { PHONES, pushWhile, setUpPhones, sleep } from './phones';

async function main() {
	const started = Date.now();
	const { url } = await startCluster();
	const { phones, checks, workshopId, leadEmail, password } = await setUpPhones(url);
	const w = { id: workshopId };
	// The phones push until the schedule ends.
	let running = true;
	const pushing = pushWhile(phones, checks, () => running);
	const events: string[] = [];
	const at = (what: string) => events.push(`${((Date.now() - started) / 1000).toFixed(0)} s ${what}`);
	const writer = 0;
	await sleep(8000);
	at('writer node killed');
	await stopNode(writer, true);
	await sleep(8000);
	at('app 1 killed');
	await stopApp(0, true);
	await sleep(6000);
	await startApp(0);
	at('app 1 back');
	await sleep(4000);
	await startNode(writer);
	at('writer node back');
	await sleep(8000);
	running = false;
	await pushing;
	at('phones done');

	// Checks, on each node directly.
	const failures: string[] = [];
	const made = phones.flatMap((p) => p.made);
	for (let i = 0; i < NODES; i++) {
		for (let t = 0; t < 120 && !nodeSynced(i); t++) await sleep(500);
		const size = Number(nodeSql(i, "SHOW GLOBAL STATUS LIKE 'wsrep_cluster_size'").split('\t')[1]);
		if (size !== NODES) failures.push(`node${i + 1} sees a cluster of ${size}`);
	}
	const db = process.env.DB_NAME ?? 'fieldbench';
	const q = (i: number, sql: string) => nodeSql(i, `USE \`${db}\`; ${sql}`);
	const [total, distinct] = q(0, `SELECT COUNT(*), COUNT(DISTINCT op_id) FROM readings WHERE workshop_id = '${w.id}'`).split('\t').map(Number);
	const storedIds = new Set(q(0, `SELECT id FROM readings WHERE workshop_id = '${w.id}'`).split('\n').filter(Boolean));
	const lost = made.filter((id) => !storedIds.has(id)).length;
	const duplicated = total - distinct;
	if (lost) failures.push(`${lost} readings lost`);
	if (duplicated) failures.push(`${duplicated} readings stored twice`);
	if (total !== made.length) failures.push(`${total} stored for ${made.length} made`);

	const seqs = q(
		0,
		`SELECT seq FROM changes WHERE workshop_id = '${w.id}' UNION ALL SELECT seq FROM readings WHERE workshop_id = '${w.id}' UNION ALL SELECT seq FROM spark_tests WHERE workshop_id = '${w.id}' UNION ALL SELECT seq FROM swap_tests WHERE workshop_id = '${w.id}' UNION ALL SELECT seq FROM signoffs WHERE workshop_id = '${w.id}' ORDER BY 1`
	)
		.split('\n')
		.filter(Boolean)
		.map(Number);
	const lastSeq = Number(q(0, `SELECT last_seq FROM change_counters WHERE workshop_id = '${w.id}'`));
	const gaps = seqs.filter((s, i) => s !== i + 1).length;
	if (gaps || seqs.length !== lastSeq) failures.push(`feed: ${seqs.length} rows for last seq ${lastSeq}, ${gaps} out of place`);

	// Every node holds the same rows.
	const counts = [...Array(NODES).keys()].map((i) =>
		q(i, `SELECT (SELECT COUNT(*) FROM readings), (SELECT COUNT(*) FROM changes), (SELECT COUNT(*) FROM sync_ops), (SELECT COUNT(*) FROM audit_log)`)
	);
	if (new Set(counts).size !== 1) failures.push(`row counts differ between nodes: ${counts.join(' | ')}`);

	// A lead's pull through the balancer returns every reading once.
	const leadClient = new Client(url, '10.9.1.1');
	await leadClient.signIn(leadEmail, password);
	let cursor = 0;
	const pulled = new Map<string, number>();
	for (;;) {
		const r = await leadClient.get(`/api/sync/pull?cursor=${cursor}&limit=1000`);
		const page = (await r.json()) as { changes: { entity: string; entityId: string }[]; cursor: number; more: boolean };
		for (const c of page.changes) if (c.entity === 'reading') pulled.set(c.entityId, (pulled.get(c.entityId) ?? 0) + 1);
		cursor = page.cursor;
		if (!page.more) break;
	}
	const pullMissing = made.filter((id) => pulled.get(id) !== 1).length;
	if (pullMissing) failures.push(`${pullMissing} readings missing or repeated in the lead's pull`);
	const bad = phones.flatMap((p) => p.bad);
	if (bad.length) failures.push(`${bad.length} answers neither applied nor duplicate: ${[...new Set(bad)].slice(0, 3).join('; ')}`);

	for (const e of events) console.log(`  ${e}`);
	const retries = phones.reduce((n, p) => n + p.retries, 0);
	console.log(
		`kills 2 (writer node, app server), phones ${PHONES}, readings ${made.length}, stored ${total}, lost ${lost}, duplicated ${duplicated}, retried batches ${retries}, feed gaps ${gaps}, cluster size ${clusterSize()}/${NODES}, nodes agree ${new Set(counts).size === 1 ? 'yes' : 'no'}, ${((Date.now() - started) / 1000).toFixed(0)} s`
	);
	if (failures.length) {
		for (const f of failures) console.log(`FAIL ${f}`);
		process.exit(1);
	}
	process.exit(0);
}

main().catch((e) => {
	console.error(e);
	process.exit(1);
});
