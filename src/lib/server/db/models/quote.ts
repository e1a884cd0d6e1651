/** The quote, price-list and payment tables (see migrations/2026-12-02T12-00-quotes-and-payments.ts). */
import { DataTypes, Model, type Sequelize } from 'sequelize';
import { jsonText } from './json-text';

export class Quote extends Model {
	declare id: string;
	declare workshopId: string;
	declare jobId: string;
	declare request: Record<string, unknown>;
	declare lines: unknown[] | null;
	declare currency: string | null;
	declare taxRateBp: number | null;
	declare netMinor: number | null;
	declare taxMinor: number | null;
	declare totalMinor: number | null;
	declare state: string;
	declare verbalName: string | null;
	declare verbalHow: string | null;
	declare verbalDecision: 'approved' | 'declined' | null;
	declare answeredAt: Date | null;
	declare answeredName: string | null;
	declare answeredVia: 'link' | 'verbal' | null;
	declare answeredBy: string | null;
	declare statusBefore: string | null;
	declare version: number;
	declare fieldVersions: string;
	declare deletedAt: Date | null;
	declare createdBy: string | null;
	declare createdAt: Date;
	declare updatedAt: Date;
}

/** BIGINT columns read back as numbers (amounts stay within Number.MAX_SAFE_INTEGER). */
const money = (field: string, allowNull = true) => ({
	type: DataTypes.BIGINT,
	allowNull,
	get(this: Model) {
		const v = this.getDataValue(field as never) as unknown;
		return v == null ? null : Number(v);
	}
});

export function initQuote(s: Sequelize, syncAttrs: () => Record<string, object>) {
	Quote.init(
		{
			...syncAttrs(),
			jobId: { type: DataTypes.UUID, allowNull: false },
			request: jsonText('request'),
			lines: { ...jsonText('lines'), field: 'priced_lines' },
			currency: { type: DataTypes.CHAR(3), allowNull: true },
			taxRateBp: { type: DataTypes.INTEGER, allowNull: true },
			netMinor: money('netMinor'),
			taxMinor: money('taxMinor'),
			totalMinor: money('totalMinor'),
			state: {
				type: DataTypes.ENUM('draft', 'sent', 'approved', 'declined', 'expired', 'replaced'),
				allowNull: false,
				defaultValue: 'draft'
			},
			verbalName: { type: DataTypes.STRING(120), allowNull: true },
			verbalHow: { type: DataTypes.STRING(200), allowNull: true },
			verbalDecision: { type: DataTypes.ENUM('approved', 'declined'), allowNull: true },
			answeredAt: { type: DataTypes.DATE(3), allowNull: true },
			answeredName: { type: DataTypes.STRING(120), allowNull: true },
			answeredVia: { type: DataTypes.ENUM('link', 'verbal'), allowNull: true },
			answeredBy: { type: DataTypes.UUID, allowNull: true },
			statusBefore: { type: DataTypes.STRING(40), allowNull: true }
		},
		{ sequelize: s, underscored: true, tableName: 'quotes' }
	);
}
