/**
 * E-mail settings, read from the environment (documented in DEVELOPERS.md and the README):
 *
 * | variable | meaning | default |
 * |---|---|---|
 * | SMTP_HOST | the mail server; without it no e-mail leaves (reports wait in the outbox) | — |
 * | SMTP_PORT | its port | 587 (465 with SMTP_SECURE) |
 * | SMTP_SECURE | `true`: TLS from the first byte (port 465) | false |
 * | SMTP_REQUIRE_TLS | `true`: refuse to send unless STARTTLS works | false |
 * | SMTP_IGNORE_TLS | `true`: never STARTTLS (the local fake only) | false |
 * | SMTP_USER, SMTP_PASSWORD | sign-in at the server, when it asks for one | — |
 * | SMTP_FROM | the sender, e.g. `Reports <reports@workshop.example>` | `Fieldbench <reports@localhost>` |
 * | SMTP_FAKE_DIR | set by the project's scripts when the local fake mail server is in use: where it saves messages | — |
 * | MAIL_POLL_MS | how often each app process looks for e-mail to send | 5000 |
 * | MAIL_RETRY_BASE_MS | the first wait before a retry; each further retry waits twice as long (at most an hour) | 30000 |
 * | MAIL_MAX_ATTEMPTS | attempts before a message is marked failed | 8 |
 * | PUBLIC_URL | the address customers open report links at | the app's own origin |
 */
import { z } from 'zod';

const flag = z
	.enum(['true', 'false', '1', '0', ''])
	.optional()
	.transform((v) => v === 'true' || v === '1');
const ms = (fallback: number, min: number) => z.coerce.number().int().min(min).max(86_400_000).default(fallback);

const env = z.object({
	SMTP_HOST: z.string().trim().min(1).optional(),
	SMTP_PORT: z.coerce.number().int().min(1).max(65535).optional(),
	SMTP_SECURE: flag,
	SMTP_REQUIRE_TLS: flag,
	SMTP_IGNORE_TLS: flag,
	SMTP_USER: z.string().optional(),
	SMTP_PASSWORD: z.string().optional(),
	SMTP_FROM: z.string().trim().min(3).default('Fieldbench <reports@localhost>'),
	SMTP_FAKE_DIR: z.string().trim().min(1).optional(),
	MAIL_POLL_MS: ms(5000, 50),
	MAIL_RETRY_BASE_MS: ms(30_000, 10),
	MAIL_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(8),
	PUBLIC_URL: z.url().optional()
});

export type MailConfig = {
	smtp: {
		host: string;
		port: number;
		secure: boolean;
		requireTLS: boolean;
		ignoreTLS: boolean;
		auth?: { user: string; pass: string };
	} | null;
	from: string;
	fakeDir: string | null;
	pollMs: number;
	retryBaseMs: number;
	maxAttempts: number;
	publicUrl: string | null;
};

/** The settings from `source` (the process environment by default); throws on a bad value. */
export function mailConfig(source: Record<string, string | undefined> = process.env): MailConfig {
	const r = env.safeParse(source);
	if (!r.success) {
		const i = r.error.issues[0];
		throw new Error(`Mail settings: ${i.path.join('.')}: ${i.message}`);
	}
	const e = r.data;
	return {
		smtp: e.SMTP_HOST
			? {
					host: e.SMTP_HOST,
					port: e.SMTP_PORT ?? (e.SMTP_SECURE ? 465 : 587),
					secure: e.SMTP_SECURE,
					requireTLS: e.SMTP_REQUIRE_TLS,
					ignoreTLS: e.SMTP_IGNORE_TLS,
					...(e.SMTP_USER ? { auth: { user: e.SMTP_USER, pass: e.SMTP_PASSWORD ?? '' } } : {})
				}
			: null,
		from: e.SMTP_FROM,
		fakeDir: e.SMTP_FAKE_DIR ?? null,
		pollMs: e.MAIL_POLL_MS,
		retryBaseMs: e.MAIL_RETRY_BASE_MS,
		maxAttempts: e.MAIL_MAX_ATTEMPTS,
		publicUrl: e.PUBLIC_URL?.replace(/\/$/, '') ?? null
	};
}

/**
 * The wait before retry number `attempt` (1 = after the first failure): `base` doubled each
 * time, at most an hour, less up to a fifth at random so that processes do not retry in step.
 */
export function retryDelay(attempt: number, base: number, random = Math.random): number {
	const full = Math.min(base * 2 ** Math.max(0, attempt - 1), 3_600_000);
	return Math.round(full * (1 - 0.2 * random()));
}
