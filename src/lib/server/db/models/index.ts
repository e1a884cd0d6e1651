/**
 * Typed Sequelize models. Tables are made by migrations, never by `sync()`. Ids are UUIDv7
 * strings (native UUID column); `field_versions` is JSON text mapping field → the record
 * version that last changed it (the server's per-field merge state, DESIGN §5).
 */
import { DataTypes, Model, type CreationOptional, type Sequelize } from 'sequelize';
import { COMPONENT_KINDS } from '../../../schemas/component';
import { JOB_STATUSES, type JobStatus } from '../../../schemas/job';
import { jsonText } from './json-text';
import { initTest, Test } from './test';
import { initQuote, Quote } from './quote';
export { Test, Quote };

import { ROLES, type Role } from '../../../roles';
export { ROLES, type Role };

export class Workshop extends Model {
	declare id: string;
	declare name: string;
	/** IANA zone name (`Europe/London`); office pages, reports and mails show times in it. */
	declare timeZone: CreationOptional<string>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class User extends Model {
	declare id: string;
	declare workshopId: string;
	declare email: string;
	declare name: string;
	declare role: Role;
	declare passwordHash: string;
	declare active: CreationOptional<boolean>;
	declare version: CreationOptional<number>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class Session extends Model {
	declare id: string;
	declare userId: string;
	declare expiresAt: Date;
	declare createdAt: CreationOptional<Date>;
}

export class AuditEntry extends Model {
	declare id: CreationOptional<number>;
	declare workshopId: string;
	declare userId: string | null;
	declare deviceId: string | null;
	declare opId: string | null;
	declare at: Date;
	declare entity: string;
	declare entityId: string;
	declare action: string;
	declare field: string | null;
	declare oldValue: string | null;
	declare newValue: string | null;
}

export class Change extends Model {
	declare workshopId: string;
	declare seq: number;
	declare entity: string;
	declare entityId: string;
	declare version: number;
	declare op: 'upsert' | 'delete' | 'evict';
	declare jobId: string | null;
	declare audience: string | null;
	declare record: string | null;
	declare at: Date;
}

export class Customer extends Model {
	declare id: string;
	declare workshopId: string;
	declare name: string;
	declare phone: string | null;
	declare email: string | null;
	declare reportConsent: boolean;
	declare version: number;
	declare fieldVersions: string;
	declare deletedAt: Date | null;
	declare createdBy: string | null;
	declare updatedBy: string | null;
	declare deviceId: string | null;
	declare deviceTime: Date | null;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export type ComponentKind = (typeof COMPONENT_KINDS)[number];
export type { JobStatus };

/** The sync columns every mutable record has. */
type Synced = {
	id: string;
	workshopId: string;
	version: number;
	fieldVersions: string;
	deletedAt: Date | null;
	createdBy: string | null;
	updatedBy: string | null;
	deviceId: string | null;
	deviceTime: Date | null;
	createdAt: CreationOptional<Date>;
	updatedAt: CreationOptional<Date>;
};

export class Vehicle extends Model {
	declare id: string;
	declare workshopId: string;
	declare customerId: string | null;
	declare vin: string | null;
	declare chassisNo: string | null;
	declare chassisReason: string | null;
	declare plate: string | null;
	declare make: string;
	declare model: string;
	declare year: number | null;
	declare engineCode: string | null;
	declare cylinders: number | null;
	declare odometer: number | null;
	declare odometerUnit: 'km' | 'mi';
	declare hybrid: boolean;
	declare version: number;
	declare deletedAt: Date | null;
}

export type FaultCode = { code: string; text: string };
export class Job extends Model {
	declare id: string;
	declare workshopId: string;
	declare number: number;
	declare customerId: string | null;
	declare vehicleId: string | null;
	declare complaint: string;
	declare location: string | null;
	declare assigneeId: string | null;
	declare status: JobStatus;
	declare codesBefore: FaultCode[] | null;
	declare codesAfter: FaultCode[] | null;
	declare notes: string | null;
	declare version: number;
	declare deletedAt: Date | null;
	declare updatedAt: Date;
}

export class Component extends Model {
	declare id: string;
	declare workshopId: string;
	declare partNumber: string;
	declare kind: ComponentKind;
	declare description: string | null;
	declare fitment: unknown;
	declare cautions: unknown;
	declare positions: unknown;
	declare version: number;
	declare deletedAt: Date | null;
}

export class SpecSheet extends Model {
	declare id: string;
	declare workshopId: string;
	declare componentId: string;
	declare sheetVersion: number;
	declare state: 'draft' | 'approved';
	declare checks: unknown;
	declare source: unknown;
	declare approvedBy: string | null;
	declare approvedAt: Date | null;
	declare version: number;
	declare deletedAt: Date | null;
}
export type { Synced };

// Getters, not shared objects: Sequelize writes into each attribute definition it is given.
const a = {
	get uuidPk() {
		return { type: DataTypes.UUID, primaryKey: true };
	},
	get uuid() {
		return { type: DataTypes.UUID, allowNull: false };
	},
	get uuidNull() {
		return { type: DataTypes.UUID, allowNull: true };
	},
	get date() {
		return { type: DataTypes.DATE(3), allowNull: false };
	},
	get dateNull() {
		return { type: DataTypes.DATE(3), allowNull: true };
	},
	get text() {
		return { type: DataTypes.TEXT('long'), allowNull: true };
	}
};
const str = (n: number, allowNull = false) => ({ type: DataTypes.STRING(n), allowNull });

/** Columns every mutable synced record has (see migrations). */
const syncAttrs = () => ({
	id: a.uuidPk,
	workshopId: a.uuid,
	version: { type: DataTypes.INTEGER, allowNull: false },
	fieldVersions: { type: DataTypes.TEXT, allowNull: false },
	deletedAt: a.dateNull,
	createdBy: a.uuidNull,
	updatedBy: a.uuidNull,
	deviceId: str(64, true),
	deviceTime: a.dateNull
});

/** Register every model on `s`. */
export function initModels(s: Sequelize): void {
	initTest(s, syncAttrs);
	initQuote(s, syncAttrs);
	const base = { sequelize: s, underscored: true };
	Workshop.init({ id: a.uuidPk, name: str(120), timeZone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' } }, { ...base, tableName: 'workshops' });
	User.init(
		{
			id: a.uuidPk,
			workshopId: a.uuid,
			email: str(254),
			name: str(120),
			role: { type: DataTypes.ENUM(...ROLES), allowNull: false },
			passwordHash: str(255),
			active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
			version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 }
		},
		{ ...base, tableName: 'users' }
	);
	Session.init(
		{ id: { type: DataTypes.STRING(64), primaryKey: true }, userId: a.uuid, expiresAt: a.date },
		{ ...base, tableName: 'sessions', updatedAt: false }
	);
	AuditEntry.init(
		{
			id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
			workshopId: a.uuid,
			userId: a.uuidNull,
			deviceId: str(64, true),
			opId: a.uuidNull,
			at: a.date,
			entity: str(40),
			entityId: a.uuid,
			action: str(20),
			field: str(64, true),
			oldValue: a.text,
			newValue: a.text
		},
		{ ...base, tableName: 'audit_log', timestamps: false }
	);
	Change.init(
		{
			workshopId: { ...a.uuid, primaryKey: true },
			seq: { type: DataTypes.BIGINT, primaryKey: true },
			entity: str(40),
			entityId: a.uuid,
			version: { type: DataTypes.INTEGER, allowNull: false },
			op: { type: DataTypes.ENUM('upsert', 'delete', 'evict'), allowNull: false },
			jobId: a.uuidNull,
			audience: a.uuidNull,
			record: a.text,
			at: a.date
		},
		{ ...base, tableName: 'changes', timestamps: false }
	);
	Customer.init(
		{
			...syncAttrs(),
			name: str(120),
			phone: str(40, true),
			email: str(254, true),
			reportConsent: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false }
		},
		{ ...base, tableName: 'customers' }
	);
	Vehicle.init(
		{
			...syncAttrs(),
			customerId: a.uuidNull,
			vin: str(17, true),
			chassisNo: str(40, true),
			chassisReason: str(200, true),
			plate: str(20, true),
			make: str(60),
			model: str(60),
			year: { type: DataTypes.SMALLINT, allowNull: true },
			engineCode: str(30, true),
			cylinders: { type: DataTypes.TINYINT.UNSIGNED, allowNull: true },
			odometer: { type: DataTypes.INTEGER, allowNull: true },
			odometerUnit: { type: DataTypes.ENUM('km', 'mi'), allowNull: false, defaultValue: 'km' },
			hybrid: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false }
		},
		{ ...base, tableName: 'vehicles' }
	);
	Job.init(
		{
			...syncAttrs(),
			number: { type: DataTypes.INTEGER, allowNull: false },
			customerId: a.uuidNull,
			vehicleId: a.uuidNull,
			complaint: { type: DataTypes.TEXT, allowNull: false },
			location: str(200, true),
			assigneeId: a.uuidNull,
			status: { type: DataTypes.ENUM(...JOB_STATUSES), allowNull: false, defaultValue: 'open' },
			codesBefore: jsonText('codesBefore'),
			codesAfter: jsonText('codesAfter'),
			notes: { type: DataTypes.TEXT, allowNull: true }
		},
		{ ...base, tableName: 'jobs' }
	);
	Component.init(
		{
			...syncAttrs(),
			partNumber: str(60),
			kind: { type: DataTypes.ENUM(...COMPONENT_KINDS), allowNull: false },
			description: str(300, true),
			fitment: jsonText('fitment'),
			cautions: jsonText('cautions'),
			positions: jsonText('positions')
		},
		{ ...base, tableName: 'components' }
	);
	SpecSheet.init(
		{
			...syncAttrs(),
			componentId: a.uuid,
			sheetVersion: { type: DataTypes.INTEGER, allowNull: false },
			state: { type: DataTypes.ENUM('draft', 'approved'), allowNull: false, defaultValue: 'draft' },
			checks: { ...jsonText('checks'), allowNull: false },
			source: jsonText('source'),
			approvedBy: a.uuidNull,
			approvedAt: a.dateNull
		},
		{ ...base, tableName: 'spec_sheets' }
	);
}
