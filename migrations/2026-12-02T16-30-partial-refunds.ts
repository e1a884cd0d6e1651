/**
 * Partial refunds and fresh quote links.
 *
 * - payment_refunds: one row per refund of a payment (card through the provider, cash or
 *   bank transfer recorded by hand), in minor units of the payment's currency, with who,
 *   when, why and the provider's refund id. `payments.refunded_minor` stays the running
 *   total (the provider's cumulative figure when its webhook knows more).
 * - quote_links.replaced_at: set on every unanswered link of a quote when a fresh link is
 *   made, so an older link is refused.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import type { MigrationContext } from '../src/lib/server/db/migrator';

const raw = (s: Sequelize, sql: string) => s.query(sql, { type: QueryTypes.RAW });

export async function up({ sequelize }: MigrationContext): Promise<void> {
	await raw(
		sequelize,
		`CREATE TABLE payment_refunds (
			id UUID NOT NULL PRIMARY KEY,
			workshop_id UUID NOT NULL,
			payment_id UUID NOT NULL,
			amount_minor BIGINT NOT NULL,
			currency CHAR(3) NOT NULL,
			method ENUM('card','cash','transfer') NOT NULL,
			state ENUM('pending','done','failed') NOT NULL,
			reason VARCHAR(300) NULL,
			provider_refund VARCHAR(255) NULL,
			failure VARCHAR(300) NULL,
			created_by UUID NULL,
			created_at DATETIME(3) NOT NULL,
			updated_at DATETIME(3) NOT NULL,
			KEY payment_refunds_payment (workshop_id, payment_id)
		)`
	);
	await raw(sequelize, 'ALTER TABLE quote_links ADD COLUMN replaced_at DATETIME(3) NULL');
}

export async function down({ sequelize }: MigrationContext): Promise<void> {
	await raw(sequelize, 'ALTER TABLE quote_links DROP COLUMN replaced_at');
	await raw(sequelize, 'DROP TABLE payment_refunds');
}
