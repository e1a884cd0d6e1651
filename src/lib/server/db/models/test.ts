/** The `tests` table: one component tested on one job, with its pinned snapshot. */
import { DataTypes, Model, type Sequelize } from 'sequelize';
import { jsonText } from './json-text';

export class Test extends Model {
	declare id: string;
	declare workshopId: string;
	declare jobId: string;
	declare componentId: string | null;
	declare sheetId: string | null;
	declare sheetVersion: number | null;
	declare partNumber: string | null;
	declare position: string | null;
	declare technicianId: string | null;
	/** An apprentice started it: a lead or owner signs it off (set by the server). */
	declare needsSignOff: boolean;
	/** The first test of the same part and positions that this one re-tests after a repair. */
	declare retestOf: string | null;
	declare meter: Record<string, unknown> | null;
	declare temperature: Record<string, unknown> | null;
	declare state: 'in_progress' | 'done' | 'abandoned';
	declare notes: string | null;
	declare version: number;
	declare fieldVersions: string;
	declare deletedAt: Date | null;
}

export function initTest(s: Sequelize, syncAttrs: () => Record<string, object>) {
	Test.init(
		{
			...syncAttrs(),
			jobId: { type: DataTypes.UUID, allowNull: false },
			componentId: { type: DataTypes.UUID, allowNull: true },
			sheetId: { type: DataTypes.UUID, allowNull: true },
			sheetVersion: { type: DataTypes.INTEGER, allowNull: true },
			partNumber: { type: DataTypes.STRING(60), allowNull: true },
			position: { type: DataTypes.STRING(20), allowNull: true },
			technicianId: { type: DataTypes.UUID, allowNull: true },
			needsSignOff: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false, field: 'needs_signoff' },
			retestOf: { type: DataTypes.UUID, allowNull: true },
			meter: jsonText('meter'),
			temperature: jsonText('temperature'),
			state: { type: DataTypes.ENUM('in_progress', 'done', 'abandoned'), allowNull: false, defaultValue: 'in_progress' },
			notes: { type: DataTypes.TEXT, allowNull: true }
		},
		{ sequelize: s, underscored: true, tableName: 'tests' }
	);
}
