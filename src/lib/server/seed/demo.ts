/**
 * The demo workshop: an invented scenario (workshop, people, vehicles, part numbers and
 * figures are all made up). Idempotent: fixed ids, and each record is created only when
 * missing, through the same services as every other write.
 */
import { Op } from 'sequelize';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, Customer, Job, SpecSheet, Test, User, Vehicle, Workshop } from '../db/models';
import * as customers from '../services/customers';
import { components, sheets } from '../services/components';
import { jobs } from '../services/jobs';
import { vehicles } from '../services/vehicles';
import { createUser, createWorkshop } from '../services/workshops';
import { DEMO_TEST_ID, seedDemoTest } from './demo-tests';
import { readReportSettings, saveReportSettings } from '../reports/settings';

export const DEMO_PASSWORD = 'bench-demo-2026';
export const DEMO_WORKSHOP = {
	id: '019a0000-0000-7000-8000-000000000001',
	name: 'Tallow Bridge Auto Electrics'
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
		vin: '0CV4SB216RT000417',
		plate: 'TB24 KQL',
		make: 'Corvane',
		model: 'Sable',
		year: 2019,
		engineCode: 'CV16T',
		odometer: 84210,
		odometerUnit: 'km',
		hybrid: false
	},
	{
		id: ID(202),
		customerId: ID(102),
		vin: '0CV2PC164ST003852',
		plate: 'TB19 XRW',
		make: 'Corvane',
		model: 'Pica',
		year: 2016,
		engineCode: 'CV14N',
		odometer: 131907,
		odometerUnit: 'km',
		hybrid: false
	},
	{
		id: ID(203),
		customerId: ID(101),
		vin: '0TS7HM409PT010266',
		plate: 'TB22 HVN',
		make: 'Tessaly',
		model: 'Meridian',
		year: 2022,
		engineCode: 'TS20H',
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
		codesBefore: []
	}
];

const COIL = {
	id: ID(401),
	partNumber: 'TB-IC-2041',
	kind: 'ignition_coil',
	description: 'Pencil ignition coil, one per cylinder (demo part, invented figures)',
	fitment: [{ make: 'Corvane', model: 'Sable', yearFrom: 2017, yearTo: 2022, engineCode: 'CV16T' }],
	cautions: ['high_voltage'],
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
			rangeHint: '200 Ω',
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
		}
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
		await createWorkshop(DEMO_WORKSHOP.name, DEMO_WORKSHOP.id);
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
		[
			Component,
			COIL.id,
			() => components.create(lead, (({ id, ...c }) => c)(COIL), { id: COIL.id })
		],
		[
			SpecSheet,
			COIL_SHEET.id,
			async () => {
				const { id, ...s } = COIL_SHEET;
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
		]
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
	return made;
}
