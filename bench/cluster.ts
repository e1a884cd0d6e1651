/**
 * `npm run bench:cluster` (not part of `npm test`): sync push through the load balancer with
 * every app server of the cluster, then with one (the others stopped and marked down by the
 * balancer's health check), the same phones and batches; prints readings per second for both
 * and their ratio. On 2 cores expect little from a second app server: the point is the
 * figure, not a goal. The cluster is started when it is not running and left running.
 */
import { readState, startApp, startCluster, stopApp } from '../scripts/lib/cluster';
import { pushWhile, setUpPhones, sleep } from '../tests/cluster/phones';

const SECONDS = Number(process.env.BENCH_SECONDS ?? 30);

async function measure(url: string, label: string) {
	const { phones, checks } = await setUpPhones(url);
	const t0 = Date.now();
	let running = true;
	const pushing = pushWhile(phones, checks, () => running);
	await sleep(SECONDS * 1000);
	running = false;
	await pushing;
	const seconds = (Date.now() - t0) / 1000;
	const sent = phones.reduce((n, p) => n + p.sent, 0);
	const bad = phones.flatMap((p) => p.bad).length;
	console.log(`${label}: ${sent} readings in ${seconds.toFixed(1)} s = ${(sent / seconds).toFixed(0)} readings/s${bad ? `, ${bad} bad answers` : ''}`);
	return sent / seconds;
}

const { url } = await startCluster();
const apps = readState()!.apps.length;
const all = await measure(url, `${apps} app servers`);
for (let i = 1; i < apps; i++) await stopApp(i);
await sleep(2000); // the balancer marks them down
const one = await measure(url, '1 app server');
for (let i = 1; i < apps; i++) await startApp(i);
console.log(`ratio ${apps} : 1 = ${(all / one).toFixed(2)} (${new Date().toISOString().slice(0, 10)}, ${SECONDS} s each)`);
process.exit(0);
