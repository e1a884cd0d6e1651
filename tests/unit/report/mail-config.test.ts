import { describe, expect, it } from 'vitest';
import { mailConfig, retryDelay } from '../../../src/lib/server/mail/config';
import { emailSubject, emailText } from '../../../src/lib/report/email';
import { buildReport } from '../../../src/lib/report/words';
import { facts } from './fixtures';

describe('mail settings from the environment', () => {
	it('send nothing without SMTP_HOST', () => {
		expect(mailConfig({}).smtp).toBeNull();
	});
	it('read the server, TLS choices and sign-in', () => {
		const c = mailConfig({ SMTP_HOST: 'mail.example.net', SMTP_SECURE: 'true', SMTP_USER: 'desk', SMTP_PASSWORD: 'pw', SMTP_FROM: 'Desk <desk@example.net>' });
		expect(c.smtp).toEqual({ host: 'mail.example.net', port: 465, secure: true, requireTLS: false, ignoreTLS: false, auth: { user: 'desk', pass: 'pw' } });
		expect(c.from).toBe('Desk <desk@example.net>');
		expect(mailConfig({ SMTP_HOST: 'mail.example.net' }).smtp?.port).toBe(587);
	});
	it('refuse a bad value by name', () => {
		expect(() => mailConfig({ SMTP_HOST: 'x', SMTP_PORT: 'seventy' })).toThrow(/SMTP_PORT/);
	});
});

describe('retries', () => {
	it('wait twice as long each time, at most an hour, less up to a fifth at random', () => {
		expect([1, 2, 3, 4].map((n) => retryDelay(n, 30_000, () => 0))).toEqual([30_000, 60_000, 120_000, 240_000]);
		expect(retryDelay(20, 30_000, () => 0)).toBe(3_600_000);
		expect(retryDelay(1, 30_000, () => 1)).toBe(24_000);
	});
});

describe('the e-mail', () => {
	it('carries the findings out of spec, the link and the closing note in plain text', () => {
		const doc = buildReport(facts());
		const text = emailText(doc, 'https://bench.example/r/abc', '1 January 2027');
		expect(emailSubject(doc)).toBe('Your vehicle report: job 1042, Harrow Lane Auto Electrics');
		expect(text).toContain('Dear Orla Brindle,');
		expect(text).toContain(`- Ignition coil TB-IC-2041, cylinder 3: ${doc.findings[2].sentence}`);
		expect(text).toContain('https://bench.example/r/abc\n(the link works until 1 January 2027).');
		expect(text).toContain(doc.closing);
	});
});
