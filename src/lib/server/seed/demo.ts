/**
 * The demo workshop: an invented scenario (workshop, people, vehicles, part numbers and
 * figures are all made up). Idempotent: fixed ids, and each record is created only when
 * missing, through the same services as every other write.
 */
import { Op, QueryTypes } from 'sequelize';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, Customer, Job, SpecSheet, Test, User, Vehicle, Workshop } from '../db/models';
import * as customers from '../services/customers';
import { components, sheets } from '../services/components';
import { jobs } from '../services/jobs';
import { vehicles } from '../services/vehicles';
import { createUser, createWorkshop } from '../services/workshops';
import { DEMO_TEST_ID, seedDemoTest } from './demo-tests';
import { seedDemoPricing } from './demo-pricing';
import { NO_START_BATTERY_TEST, NO_START_JOB, NO_START_PARTS, NO_START_SHEETS, seedNoStartTests } from './demo-circuits';
import { readReportSettings, saveReportSettings } from '../reports/settings';

export const DEMO_PASSWORD = 'bench-demo-2026';
export const DEMO_WORKSHOP = {
	id: '019a0000-0000-7000-8000-000000000001',
	name: 'Tallow Bridge Auto Electrics',
	/** The invented workshop sits in an invented British town (Millbrook), so it keeps UK time. */
	timeZone: 'Europe/London'
};

export const DEMO_USERS = [
	{
		id: '019a0000-0000-7000-8000-0000000000a1',
		role: 'owner',
		name: 'Petra Quillon',
		email: 'owner@tallowbridge.example'
	},
	{
		id: '019a0000-0000-7000-8000-0000000000a2',
		role: 'lead',
		name: 'Desmond Arkwell',
		email: 'lead@tallowbridge.example'
	},
	{
		id: '019a0000-0000-7000-8000-0000000000a3',
		role: 'technician',
		name: 'Sanna Velloway',
		email: 'tech@tallowbridge.example'
	},
	{
		id: '019a0000-0000-7000-8000-0000000000a4',
		role: 'apprentice',
		name: 'Jory Pendle',
		email: 'apprentice@tallowbridge.example'
	}
] as const;

const ID = (n: number) => `019a0000-0000-7000-8000-${String(n).padStart(12, '0')}`;

const CUSTOMERS = [
	{
		id: ID(101),
		name: 'Ilse Marrow',
		phone: '0100 555 0101',
		email: 'ilse.marrow@example.net',
		reportConsent: true
	},
	{ id: ID(102), name: 'Tobiah Wren', phone: '0100 555 0102', email: null, reportConsent: false }
];

const VEHICLES = [
	{
		id: ID(201),
		customerId: ID(101),
		vin: '0CV4SB219KT000417',
		plate: 'TB24 KQL',
		make: 'Corvane',
		model: 'Brisel',
		year: 2019,
		engineCode: 'CV16T',
		cylinders: 4,
		odometer: 84210,
		odometerUnit: 'km',
		hybrid: false
	},
	{
		id: ID(202),
		customerId: ID(102),
		vin: '0CV2PC165GT003852',
		plate: 'TB19 XRW',
		make: 'Corvane',
		model: 'Pica',
		year: 2016,
		engineCode: 'CV14N',
		cylinders: 4,
		odometer: 131907,
		odometerUnit: 'km',
		hybrid: false
	},
	{
		id: ID(203),
		customerId: ID(101),
		vin: '0TS7HM402NT010266',
		plate: 'TB22 HVN',
		make: 'Tessaly',
		model: 'Ondrava',
		year: 2022,
		engineCode: 'TS20H',
		cylinders: 4,
		odometer: 30455,
		odometerUnit: 'km',
		hybrid: true
	}
];

const JOBS = [
	{
		id: ID(301),
		number: 1001,
		customerId: ID(101),
		vehicleId: ID(201),
		assigneeId: DEMO_USERS[2].id,
		complaint: 'Misfire at idle, worse when cold; warning light flashing on the drive home.',
		location: 'Customer’s driveway, 14 Orchard Row',
		codesBefore: [{ code: 'P0303', text: 'Cylinder 3 misfire detected' }]
	},
	{
		id: ID(302),
		number: 1002,
		customerId: ID(102),
		vehicleId: ID(202),
		assigneeId: DEMO_USERS[3].id,
		complaint: 'Rough running once warm; hesitates under load.',
		location: 'Workshop bay 2',
		codesBefore: [{ code: 'P0300', text: 'Random misfire detected' }]
	},
	{
		id: ID(303),
		number: 1003,
		customerId: ID(101),
		vehicleId: ID(203),
		assigneeId: DEMO_USERS[3].id,
		complaint: 'Hybrid: engine misfires when it starts by itself in READY mode; warning light on.',
		location: 'Workshop bay 1 (high-voltage bay)',
		codesBefore: [{ code: 'P0302', text: 'Cylinder 2 misfire detected' }]
	},
	{ ...NO_START_JOB, assigneeId: DEMO_USERS[2].id }
];

const COIL = {
	id: ID(401),
	partNumber: 'TB-IC-2041',
	kind: 'ignition_coil',
	description: 'Pencil ignition coil, one per cylinder (demo part, invented figures)',
	fitment: [{ make: 'Corvane', model: 'Brisel', yearFrom: 2017, yearTo: 2022, engineCode: 'CV16T' }],
	cautions: ['high_voltage'],
	positions: []
};

/** The two-coil pack of the README's CSV example, on the apprentice's job (invented). */
const PACK = {
	id: ID(402),
	partNumber: 'QX-CP-3307',
	kind: 'coil_pack',
	description: 'Two-coil pack, waste spark (demo part, invented figures)',
	fitment: [{ make: 'Corvane', model: 'Pica', yearFrom: 2014, yearTo: 2018, engineCode: 'CV14N' }],
	cautions: ['high_voltage'],
	positions: [
		{ position: 'A', cylinders: [1, 4] },
		{ position: 'B', cylinders: [2, 3] }
	]
};

/** An airbag part: the test screen refuses ohmmeter checks on it (invented). */
const AIRBAG = {
	id: ID(403),
	partNumber: 'TB-AB-0711',
	kind: 'other',
	description: 'Driver airbag module (demo part): never tested with an ohmmeter',
	fitment: [{ make: 'Corvane', model: 'Brisel', yearFrom: 2017, yearTo: 2022, engineCode: 'CV16T' }],
	cautions: ['airbag'],
	positions: []
};

/** Invented figures for the demo only. */
const COIL_SHEET = {
	id: ID(501),
	componentId: COIL.id,
	source: { document: 'Tallow Bridge demo data sheet (invented)', section: '2.1', page: '4' },
	checks: [
		{
			key: 'primary',
			label: 'Primary winding',
			quantity: 'resistance',
			from: '1',
			to: '2',
			condition: 'key_off',
			rangeHint: 'lowest Ω range',
			unit: 'Ω',
			openOk: false,
			bands: [
				{ fromC: null, toC: 50, min: 0.38, max: 0.58 },
				{ fromC: 50, toC: 100, min: 0.47, max: 0.68 }
			]
		},
		{
			key: 'secondary',
			label: 'Secondary winding',
			quantity: 'resistance',
			from: '1',
			to: 'HT',
			condition: 'key_off',
			rangeHint: '20 kΩ',
			unit: 'kΩ',
			openOk: false,
			bands: [
				{ fromC: null, toC: 50, min: 8800, max: 14600 },
				{ fromC: 50, toC: 100, min: 11000, max: 17400 }
			]
		},
		{
			key: 'spark_gap',
			label: 'Spark across the tester gap',
			quantity: 'spark',
			from: 'HT',
			to: 'earth',
			condition: 'cranking',
			rangeHint: null,
			unit: 'mm',
			openOk: false,
			bands: [{ fromC: null, toC: null, min: 0.007, max: 0.007 }]
		}
	]
};

const winding = (coil: string, key: string, label: string, unit: string, hint: string, bands: object[]) => ({
	key: `${key}_${coil.toLowerCase()}`,
	label: `${label}, coil ${coil}`,
	quantity: 'resistance',
	from: key === 'primary' ? '1' : `HT${coil === 'A' ? 1 : 2}`,
	to: key === 'primary' ? (coil === 'A' ? '2' : '3') : `HT${coil === 'A' ? 4 : 3}`,
	condition: 'key_off',
	rangeHint: hint,
	unit,
	openOk: false,
	bands,
	coil
});

/** The pack's sheet: each coil's windings (checked once, under that coil) and a look at the case. Invented figures. */
const PACK_SHEET = {
	id: ID(502),
	componentId: PACK.id,
	source: { document: 'Invented data sheet', section: '3', page: '7' },
	checks: [
		{
			key: 'case',
			label: 'Case and towers: cracks, tracking, corrosion',
			quantity: 'visual',
			from: null,
			to: null,
			condition: 'key_off',
			rangeHint: null,
			unit: null,
			openOk: false,
			bands: []
		},
		...['A', 'B'].flatMap((coil) => [
			winding(coil, 'primary', 'Primary winding', 'Ω', 'lowest Ω range', [
				{ fromC: null, toC: 50, min: 0.5, max: 0.8 },
				{ fromC: 50, toC: 100, min: 0.6, max: 0.9 }
			]),
			winding(coil, 'secondary', 'Secondary winding', 'kΩ', '20 kΩ', [{ fromC: null, toC: 50, min: 9100, max: 12400 }])
		])
	]
};

async function missing(model: { findOne: (o: object) => Promise<unknown> }, id: string) {
	return !(await model.findOne({ where: { id } }));
}

/** Create whatever of the demo workshop is missing; returns the number of records made. */
export async function seedDemo(): Promise<number> {
	db(); // registers the models
	let made = 0;
	if (await missing(Workshop, DEMO_WORKSHOP.id)) {
		await createWorkshop(DEMO_WORKSHOP.name, DEMO_WORKSHOP.id, DEMO_WORKSHOP.timeZone);
		made++;
	}
	for (const u of DEMO_USERS) {
		if (!(await User.findOne({ where: { [Op.or]: [{ id: u.id }, { email: u.email }] } }))) {
			await createUser(DEMO_WORKSHOP.id, { ...u, password: DEMO_PASSWORD }, null, u.id);
			made++;
		}
	}
	const lead: Actor = {
		userId: DEMO_USERS[1].id,
		workshopId: DEMO_WORKSHOP.id,
		role: 'lead',
		deviceId: 'seed'
	};
	type Step = [{ findOne: (o: object) => Promise<unknown> }, string, () => Promise<unknown>];
	const steps: Step[] = [
		...CUSTOMERS.map(
			({ id, ...c }) => [Customer, id, () => customers.create(lead, c, { id })] as Step
		),
		...VEHICLES.map(
			({ id, ...v }) => [Vehicle, id, () => vehicles.create(lead, v, { id })] as Step
		),
		...JOBS.map(
			({ id, number, ...j }) =>
				[Job, id, () => jobs.create(lead, j, { id, serverFields: { number } })] as Step
		),
		...[COIL, PACK, AIRBAG, ...NO_START_PARTS].map(
			({ id, ...c }) => [Component, id, () => components.create(lead, c, { id })] as Step
		),
		...[COIL_SHEET, PACK_SHEET, ...NO_START_SHEETS].map(
			({ id, ...s }) =>
				[
					SpecSheet,
					id,
					async () => {
						const draft = await sheets.create(lead, s, { id });
						await sheets.update(
							lead,
							id,
							draft.version as number,
							{},
							{
								serverFields: { state: 'approved', approvedBy: lead.userId, approvedAt: new Date() }
							}
						);
					}
				] as Step
		)
	];
	for (const [model, id, make] of steps) {
		if (await missing(model, id)) {
			await make();
			made++;
		}
	}
	if ((await readReportSettings(DEMO_WORKSHOP.id)).version === 0) {
		await saveReportSettings(lead, 0, {
			address: '7 Tallow Bridge Road, Millbrook MB4 2QT',
			phone: '0100 555 0100',
			email: 'desk@tallowbridge.example',
			paper: 'a4',
			linkDays: 30,
			techniciansSend: false
		});
		made++;
	}
	if (await missing(Test, DEMO_TEST_ID)) {
		const t = DEMO_USERS[2];
		const tech = { id: t.id, workshopId: DEMO_WORKSHOP.id, workshopName: DEMO_WORKSHOP.name, email: t.email, name: t.name, role: t.role };
		await seedDemoTest(tech, { jobId: JOBS[0].id, componentId: COIL.id, sheetId: COIL_SHEET.id });
		made++;
	}
	made += await seedDemoPricing(lead);
	const [done] = await db().query<{ n: number }>('SELECT COUNT(*) AS n FROM circuit_tests WHERE id = ?', { replacements: [NO_START_BATTERY_TEST], type: QueryTypes.SELECT });
	if (!Number(done.n)) {
		const t = DEMO_USERS[2];
		await seedNoStartTests({ id: t.id, workshopId: DEMO_WORKSHOP.id, workshopName: DEMO_WORKSHOP.name, email: t.email, name: t.name, role: t.role });
		made++;
	}
	return made;
}
