/**
 * `npm run cluster:start | cluster:stop | cluster:status`: three Galera nodes, the app
 * servers and HAProxy on loopback (scripts/lib/cluster.ts; docs/scaling.md). The
 * single-machine `npm start` stays the default.
 */
import { clusterStatus, startCluster, stopCluster } from './lib/cluster';

const cmd = process.argv[2];
if (cmd === 'start') {
	const { url } = await startCluster();
	for (const line of clusterStatus()) console.log(line);
	console.log(`\nFieldbench (cluster) is running at ${url}`);
} else if (cmd === 'stop') {
	await stopCluster();
	console.log('The cluster is stopped.');
} else if (cmd === 'status') {
	for (const line of clusterStatus()) console.log(line);
} else {
	console.error('usage: tsx scripts/cluster.ts start|stop|status');
	process.exit(2);
}
process.exit(0);
