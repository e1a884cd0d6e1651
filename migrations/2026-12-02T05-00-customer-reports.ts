/**
 * Customer reports and the e-mail outbox.
 *
 * - `report_settings`: one row per workshop — the details printed on a report, the paper
 *   size, how long a report link stays open, and whether technicians may send reports.
 * - `reports`: each report handed to a customer, frozen: its words (JSON) and the exact PDF
 *   that went out, the hash of its link token (the token itself is never stored), when the
 *   link expires and whether it was withdrawn.
 * - `mail_outbox`: e-mail waiting to go, being sent, sent or failed; one row per message
 *   with its idempotency key (unique) and the lease of the worker sending it.
 * - `mail_attempts`: every attempt at sending a message and the mail server's reply.
 */
import { QueryTypes } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const TABLES: [string, string][] = [
	[
		'report_settings',
		`workshop_id UUID NOT NULL PRIMARY KEY,
		address VARCHAR(300) NULL,
		phone VARCHAR(40) NULL,
		email VARCHAR(254) NULL,
		paper ENUM('a4','letter') NOT NULL DEFAULT 'a4',
		link_days SMALLINT NOT NULL DEFAULT 30,
		technicians_send TINYINT(1) NOT NULL DEFAULT 0,
		version INT NOT NULL DEFAULT 1,
		updated_by UUID NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL`
	],
	[
		'reports',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		send_key UUID NOT NULL,
		token_hash CHAR(64) NOT NULL,
		channel ENUM('email','link') NOT NULL,
		recipient VARCHAR(254) NULL,
		paper ENUM('a4','letter') NOT NULL,
		content LONGTEXT NOT NULL,
		pdf LONGBLOB NOT NULL,
		pdf_sha256 CHAR(64) NOT NULL,
		expires_at DATETIME(3) NOT NULL,
		withdrawn_at DATETIME(3) NULL,
		withdrawn_by UUID NULL,
		created_by UUID NOT NULL,
		created_at DATETIME(3) NOT NULL,
		UNIQUE KEY reports_token (token_hash),
		UNIQUE KEY reports_send_key (workshop_id, send_key),
		KEY reports_job (job_id, created_at)`
	],
	[
		'mail_outbox',
		`id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		report_id UUID NULL,
		idempotency_key VARCHAR(120) NOT NULL,
		message_id VARCHAR(250) NOT NULL,
		to_address VARCHAR(254) NOT NULL,
		subject VARCHAR(300) NOT NULL,
		text_body LONGTEXT NOT NULL,
		link_secret VARCHAR(100) NULL,
		state ENUM('queued','sending','sent','failed') NOT NULL DEFAULT 'queued',
		attempts INT NOT NULL DEFAULT 0,
		next_attempt_at DATETIME(3) NOT NULL,
		lease_token CHAR(36) NULL,
		lease_until DATETIME(3) NULL,
		last_reply TEXT NULL,
		sent_at DATETIME(3) NULL,
		created_by UUID NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL,
		UNIQUE KEY mail_outbox_key (idempotency_key),
		KEY mail_outbox_due (state, next_attempt_at),
		KEY mail_outbox_report (report_id)`
	],
	[
		'mail_attempts',
		`id BIGINT NOT NULL AUTO_INCREMENT PRIMARY KEY,
		outbox_id UUID NOT NULL,
		attempt INT NOT NULL,
		worker VARCHAR(100) NOT NULL,
		outcome ENUM('sending','sent','retry','failed','interrupted') NOT NULL DEFAULT 'sending',
		reply TEXT NULL,
		started_at DATETIME(3) NOT NULL,
		finished_at DATETIME(3) NULL,
		KEY mail_attempts_outbox (outbox_id, attempt)`
	]
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const [name, body] of TABLES) {
		await sequelize.query(
			`CREATE TABLE ${name} (${body}) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`,
			{ type: QueryTypes.RAW }
		);
	}
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const [name] of [...TABLES].reverse()) {
		await sequelize.query(`DROP TABLE IF EXISTS ${name}`, { type: QueryTypes.RAW });
	}
}
