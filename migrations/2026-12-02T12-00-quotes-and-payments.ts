/**
 * Quotes, the customer's answer and payments.
 *
 * - workshop_pricing: one row per workshop (currency, tax rate in basis points, labour rate
 *   per hour and the diagnostic fee in minor units); a workshop without a row has none set.
 * - price_items: the workshop's price list (parts by part number, labour jobs with their
 *   usual time in thousandths of an hour), prices in minor units before tax.
 * - quotes: a mutable synced record (the sync columns), made on the phone from the findings;
 *   the priced lines, tax, totals, currency and state are the server's.
 * - quote_links: the customer's link (only the token's SHA-256), its expiry, the answer,
 *   the typed name and the exact quote shown.
 * - payments: one row per payment asked or recorded (card through the provider, cash,
 *   bank transfer), with the provider's session and payment ids.
 * - payment_events: every provider event applied, by its id (each applied once).
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

const SYNC_COLUMNS = `version INT NOT NULL DEFAULT 1,
		field_versions TEXT NOT NULL,
		deleted_at DATETIME(3) NULL,
		created_by UUID NULL,
		updated_by UUID NULL,
		device_id VARCHAR(64) NULL,
		device_time DATETIME(3) NULL,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL`;

const UP = [
	`CREATE TABLE workshop_pricing (
		workshop_id UUID NOT NULL PRIMARY KEY,
		currency CHAR(3) NOT NULL,
		tax_rate_bp INT NOT NULL,
		labour_rate_minor BIGINT NOT NULL,
		diagnostic_fee_minor BIGINT NOT NULL,
		version INT NOT NULL DEFAULT 1,
		updated_by UUID NULL,
		updated_at DATETIME(3) NOT NULL
	)`,
	`CREATE TABLE price_items (
		id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		kind ENUM('part','labour') NOT NULL,
		part_number VARCHAR(60) NULL,
		label VARCHAR(200) NOT NULL,
		price_minor BIGINT NOT NULL,
		hours_milli INT NULL,
		active TINYINT(1) NOT NULL DEFAULT 1,
		created_at DATETIME(3) NOT NULL,
		updated_at DATETIME(3) NOT NULL,
		KEY price_items_workshop (workshop_id, kind, active),
		KEY price_items_part (workshop_id, part_number)
	)`,
	`CREATE TABLE quotes (
		id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		request LONGTEXT NOT NULL,
		priced_lines LONGTEXT NULL,
		currency CHAR(3) NULL,
		tax_rate_bp INT NULL,
		net_minor BIGINT NULL,
		tax_minor BIGINT NULL,
		total_minor BIGINT NULL,
		state ENUM('draft','sent','approved','declined','expired','replaced') NOT NULL DEFAULT 'draft',
		verbal_name VARCHAR(120) NULL,
		verbal_how VARCHAR(200) NULL,
		verbal_decision ENUM('approved','declined') NULL,
		answered_at DATETIME(3) NULL,
		answered_name VARCHAR(120) NULL,
		answered_via ENUM('link','verbal') NULL,
		answered_by UUID NULL,
		status_before VARCHAR(40) NULL,
		${SYNC_COLUMNS},
		KEY quotes_job (workshop_id, job_id)
	)`,
	`CREATE TABLE quote_links (
		id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		quote_id UUID NOT NULL,
		token_hash CHAR(64) NOT NULL,
		expires_at DATETIME(3) NOT NULL,
		created_by UUID NULL,
		created_at DATETIME(3) NOT NULL,
		shown LONGTEXT NOT NULL,
		answered_at DATETIME(3) NULL,
		decision ENUM('approved','declined') NULL,
		typed_name VARCHAR(120) NULL,
		UNIQUE KEY quote_links_token (token_hash),
		KEY quote_links_quote (quote_id)
	)`,
	`CREATE TABLE payments (
		id UUID NOT NULL PRIMARY KEY,
		workshop_id UUID NOT NULL,
		job_id UUID NOT NULL,
		quote_id UUID NULL,
		purpose ENUM('quote','diagnostic') NOT NULL,
		method ENUM('card','cash','transfer') NOT NULL,
		amount_minor BIGINT NOT NULL,
		currency CHAR(3) NOT NULL,
		state ENUM('pending','paid','failed','refunded','expired') NOT NULL,
		refunded_minor BIGINT NOT NULL DEFAULT 0,
		provider_session VARCHAR(255) NULL,
		provider_payment VARCHAR(255) NULL,
		pay_url VARCHAR(1000) NULL,
		note VARCHAR(300) NULL,
		failure VARCHAR(300) NULL,
		created_by UUID NULL,
		created_at DATETIME(3) NOT NULL,
		paid_at DATETIME(3) NULL,
		updated_at DATETIME(3) NOT NULL,
		version INT NOT NULL DEFAULT 1,
		KEY payments_job (workshop_id, job_id),
		KEY payments_state (workshop_id, state, created_at),
		UNIQUE KEY payments_session (provider_session)
	)`,
	`CREATE TABLE payment_events (
		event_id VARCHAR(255) NOT NULL PRIMARY KEY,
		workshop_id UUID NULL,
		payment_id UUID NULL,
		type VARCHAR(100) NOT NULL,
		provider_created BIGINT NOT NULL,
		outcome VARCHAR(40) NOT NULL,
		received_at DATETIME(3) NOT NULL,
		KEY payment_events_payment (payment_id)
	)`
];

const DOWN = [
	'DROP TABLE payment_events',
	'DROP TABLE payments',
	'DROP TABLE quote_links',
	'DROP TABLE quotes',
	'DROP TABLE price_items',
	'DROP TABLE workshop_pricing'
];

export async function up({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of UP) await raw(sequelize, sql);
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	for (const sql of DOWN) await raw(sequelize, sql);
}
