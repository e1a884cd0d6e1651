/**
 * A test runner's own local fakes (mail, photo store, payments; scripts/lib/), all under one
 * name so two runners never mix: messages in .data/mail/<name>/, objects in .data/s3/<name>/,
 * both removed when the runner stops them.
 */
import { mailEnv, startMailServer, stopMailServer } from '../../scripts/lib/mail';
import { payEnv, startPayServer, stopPayServer } from '../../scripts/lib/pay';
import { s3Env, startS3Server, stopS3Server } from '../../scripts/lib/s3';

/** E-mail looked at often and retried soon, so the tests do not wait long. */
const FAST_MAIL = { MAIL_POLL_MS: '500', MAIL_RETRY_BASE_MS: '300', MAIL_MAX_ATTEMPTS: '8' };

/**
 * Start the fakes of `name`; the payment fake sends its webhooks to the app on `appPort`.
 * `env` is what the app is given to use them (`photos` added to the photo store's part).
 */
export async function startFakes(name: string, appPort: number, photos: Record<string, string> = {}) {
	const mail = await startMailServer(name);
	const store = await startS3Server(name);
	const pay = await startPayServer(name, `http://127.0.0.1:${appPort}/api/pay/webhook`);
	const s3 = { ...s3Env(store.port), ...photos };
	return { mail, s3, pay, env: { ...mailEnv(mail.port, mail.dir), ...FAST_MAIL, ...s3, ...payEnv(pay.url) } };
}

/** Stop the fakes of `name` and remove what they kept. */
export async function stopFakes(name: string) {
	await stopMailServer(name, true);
	await stopPayServer(name);
	await stopS3Server(name, true);
}
