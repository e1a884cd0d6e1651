/**
 * The local fake payment provider (scripts/fake-pay.js) for `npm start` and the tests, run
 * like the fake mail server (lib/fake-service.ts): a background process on 127.0.0.1, on
 * 12111 or the next free port, its pid and port under .data/pay-<name>.pid|port. The app
 * reaches it through the provider's SDK pointed at `PAY_FAKE_URL`; the fake signs its
 * webhooks with the same `STRIPE_WEBHOOK_SECRET` the app checks them with, and sends them to
 * `webhookUrl`.
 */
import { fakeFiles, startFake, stopFake } from './fake-service';

const DEFAULT_PORT = Number(process.env.FAKE_PAY_PORT ?? 12111);
/** Test-mode keys of the local fake only (they open nothing anywhere else). */
export const FAKE_KEY = 'sk_test_fieldbench_local';
export const FAKE_WEBHOOK_SECRET = 'whsec_fieldbench_local';

/** Whether the fake payment provider (not some other server) answers on the port. */
async function answers(port: number): Promise<boolean> {
	try {
		const r = await fetch(`http://127.0.0.1:${port}/health`, { signal: AbortSignal.timeout(1000) });
		return r.ok && (await r.json()).fake === 'payments';
	} catch {
		return false;
	}
}

/** Start (or reuse) the fake of `name`, sending its webhooks to `webhookUrl`. */
export async function startPayServer(name: string, webhookUrl: string) {
	const service = {
		label: 'The fake payment provider',
		script: 'fake-pay.js',
		args: ['--key', FAKE_KEY, '--webhook-secret', FAKE_WEBHOOK_SECRET, '--webhook-url', webhookUrl],
		defaultPort: DEFAULT_PORT,
		answers
	};
	const { port, started } = await startFake(fakeFiles('pay', name), service);
	const url = `http://127.0.0.1:${port}`;
	// A running fake was started with another app's address: send this one's webhooks here.
	if (!started) await fetch(`${url}/_fake/webhook-url`, { method: 'POST', body: JSON.stringify({ url: webhookUrl }) });
	return { port, url, started };
}

/** Stop the fake of `name` and wait until it is gone. */
export async function stopPayServer(name: string): Promise<boolean> {
	return stopFake(fakeFiles('pay', name), true);
}

/** Environment for the app to take payments through the fake. */
export function payEnv(url: string): Record<string, string> {
	return { STRIPE_SECRET_KEY: FAKE_KEY, STRIPE_WEBHOOK_SECRET: FAKE_WEBHOOK_SECRET, PAY_FAKE_URL: url };
}
