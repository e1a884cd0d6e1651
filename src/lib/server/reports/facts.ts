/**
 * The facts of a job for its customer report, read from the workshop's records: the job,
 * its vehicle and customer, each test with its pinned sheet and the latest server result of
 * every check at every position, the spark and swap tests, the circuit tests (battery,
 * charging, …) with the workshop's result, who tested, and the workshop's
 * details. Everything is scoped to the actor's workshop.
 */
import { isoDayIn } from '../../zoned-time';
import { Op, QueryTypes } from 'sequelize';
import { parseNumbers } from '../../sync/json';
import type { ReportNotes } from '../../schemas/report';
import type { CheckFacts, ComponentKindName, ReadingFacts, ReportFacts, ReportPhoto, TestFacts } from '../../report/types';
import type { TemperatureSnapshot } from '../../flow/reading';
import type { Actor } from '../auth/types';
import { db } from '../db';
import { Component, Customer, Job, SpecSheet, Test, User, Vehicle } from '../db/models';
import { NotFoundError } from '../errors';
import type { ReportSettings } from './settings';
import { jobRecords } from '../services/job-facts';
import { signOffStates } from '../../tests/facts';
import { isSignedOff } from '../../tests/signoff';
import { customerPhotos } from '../photos/service';
import { circuitSignOffStates } from '../../tests/circuit-signoff';
import type { CircuitFacts } from '../../report/types';
import type { CircuitResult } from '../../flow/circuit';

/**
 * The photos of a job chosen for the customer (`photos/service.ts`: marked "for the
 * customer", not removed), each with its thumbnail inline so the customer's page and the
 * PDF need nothing else.
 */
export async function photosForCustomer(actor: Actor, jobId: string): Promise<ReportPhoto[]> {
	return customerPhotos(actor, jobId);
}

type Row = Record<string, unknown>;
const select = (sql: string, replacements: unknown[]) =>
	db().query<Row>(sql, { replacements, type: QueryTypes.SELECT });

/** The latest row per key, rows given in feed order (seq). */
function latestBy<T>(rows: T[], key: (r: T) => string): T[] {
	const m = new Map<string, T>();
	for (const r of rows) m.set(key(r), r);
	return [...m.values()];
}

async function testsOf(actor: Actor, jobId: string) {
	const tests = await Test.findAll({
		where: { workshopId: actor.workshopId, jobId, deletedAt: { [Op.is]: null }, state: ['in_progress', 'done'] },
		order: [['createdAt', 'ASC']]
	});
	const ids = (k: 'sheetId' | 'componentId') => [...new Set(tests.map((t) => t[k]).filter(Boolean))] as string[];
	const [sheets, components, readings] = await Promise.all([
		SpecSheet.findAll({ where: { workshopId: actor.workshopId, id: ids('sheetId') } }),
		Component.findAll({ where: { workshopId: actor.workshopId, id: ids('componentId') } }),
		select(
			`SELECT test_id, check_key, position, server_result FROM readings WHERE workshop_id = ? AND job_id = ? ORDER BY seq`,
			[actor.workshopId, jobId]
		)
	]);
	const sheet = new Map(sheets.map((s) => [s.id, s]));
	const component = new Map(components.map((c) => [c.id, c]));
	const latest = latestBy(readings, (r) => `${r.test_id}|${r.position ?? ''}|${r.check_key}`);
	return tests.map((t): TestFacts & { id: string; technicianId: string | null } => {
		const c = t.componentId ? component.get(t.componentId) : undefined;
		const checks = ((t.sheetId ? (sheet.get(t.sheetId)?.checks as CheckFacts[] | undefined) : undefined) ?? []).map((k) => ({
			key: k.key,
			label: k.label,
			quantity: k.quantity,
			unit: k.unit,
			openOk: k.openOk,
			bands: k.bands
		}));
		const pack = ((c?.positions as { position: string; cylinders: number[] }[] | null) ?? []).filter(Boolean);
		const positions = String(t.position ?? '')
			.split(',')
			.map((p) => p.trim())
			.filter(Boolean)
			.map((position) => ({ position, cylinders: pack.find((p) => p.position === position)?.cylinders ?? null }));
		const results: ReadingFacts[] = latest
			.filter((r) => r.test_id === t.id && r.server_result)
			.map((r) => {
				const s = parseNumbers<{ value: number | null; verdict: ReadingFacts['verdict']; bands: ReadingFacts['bands'] }>(String(r.server_result));
				return { position: (r.position as string | null) ?? null, checkKey: String(r.check_key), value: s.value, verdict: s.verdict, bands: s.bands ?? [] };
			});
		return {
			partNumber: t.partNumber ?? c?.partNumber ?? null,
			kind: (c?.kind as ComponentKindName | undefined) ?? null,
			positions,
			temperature: (t.temperature as TemperatureSnapshot | null) ?? null,
			checks,
			readings: results,
			id: t.id,
			technicianId: t.technicianId
		};
	});
}

export type JobParties = {
	job: Job;
	customer: Customer | null;
	vehicle: Vehicle | null;
};

/** The live job with its customer and vehicle (404 when it is not in the workshop). */
export async function jobWithParties(actor: Actor, jobId: string): Promise<JobParties> {
	const job = await Job.findOne({ where: { id: jobId, workshopId: actor.workshopId, deletedAt: { [Op.is]: null } } });
	if (!job) throw new NotFoundError('Job');
	const [customer, vehicle] = await Promise.all([
		job.customerId ? Customer.findOne({ where: { id: job.customerId, workshopId: actor.workshopId } }) : null,
		job.vehicleId ? Vehicle.findOne({ where: { id: job.vehicleId, workshopId: actor.workshopId } }) : null
	]);
	return { job, customer, vehicle };
}

/** A stored circuit test as the report's facts: the workshop's result and what says what was tested. */
function circuitFactsOf(r: Row): CircuitFacts {
	const result = parseNumbers<CircuitResult>(String(r.server_result));
	const inputs = JSON.parse(String(r.inputs)) as Record<string, unknown>;
	const text = (k: string) => (typeof inputs[k] === 'string' && inputs[k] ? (inputs[k] as string) : null);
	return {
		kind: r.kind as CircuitFacts['kind'],
		partNumber: text('partNumber'),
		verdict: result.verdict,
		lines: result.lines ?? [],
		days: typeof result.days === 'number' && Number.isFinite(result.days) ? result.days : null,
		side: result.side ?? null,
		circuit: text('circuit'),
		which: r.kind !== 'sensor' ? null : text('which') === 'cam' ? 'cam' : 'crank'
	};
}

/** Apprentices' circuit tests left out of the report (not signed off, and not done again since). */
const awaitingCircuits = (states: ReturnType<typeof circuitSignOffStates>) =>
	[...states.values()].filter((s) => !isSignedOff(s.state) && !s.replaced).length;

/**
 * Everything the report says about the job, plus the notes the sender adds. A test logged by
 * an apprentice goes in only once a lead has signed it off (its latest decision a sign-off,
 * as `signOffStateOf` reads it: a test sent back stays out); `awaitingSignOff` counts those
 * left out.
 */
export async function gatherFacts(
	actor: Actor,
	p: JobParties,
	settings: ReportSettings,
	notes: ReportNotes,
	now = new Date()
): Promise<{ facts: ReportFacts; awaitingSignOff: number }> {
	const { job, customer, vehicle } = p;
	const [all, records, sparks, swaps, photos, circuitRows] = await Promise.all([
		testsOf(actor, job.id),
		jobRecords(actor, job.id),
		select(`SELECT position, gap_mm, outcome FROM spark_tests WHERE workshop_id = ? AND job_id = ? ORDER BY seq`, [actor.workshopId, job.id]),
		select(`SELECT from_position, to_position, conclusion FROM swap_tests WHERE workshop_id = ? AND job_id = ? ORDER BY seq`, [actor.workshopId, job.id]),
		photosForCustomer(actor, job.id),
		select(`SELECT id, kind, inputs, server_result, created_by FROM circuit_tests WHERE workshop_id = ? AND job_id = ? ORDER BY seq`, [actor.workshopId, job.id])
	]);
	const testerIds = [...new Set([...all.map((t) => t.technicianId), ...circuitRows.map((r) => r.created_by as string), job.assigneeId].filter(Boolean))] as string[];
	const users = await User.findAll({ where: { workshopId: actor.workshopId, id: testerIds } });
	const names = new Map(users.map((u) => [u.id, u.name]));
	const states = signOffStates(records.tests, records.readings, records.decisions);
	const tests = all.filter((t) => isSignedOff(states.get(t.id) ?? 'not_needed'));
	// Circuit tests by the same rule: an apprentice's only once signed off.
	const circuitStates = circuitSignOffStates(records.circuits, records.decisions);
	const shownCircuits = circuitRows.filter((r) => isSignedOff(circuitStates.get(String(r.id))?.state ?? 'not_needed'));
	const circuits = shownCircuits.map(circuitFactsOf);
	const tested = [
		...tests.filter((t) => t.readings.length).map((t) => t.technicianId),
		...shownCircuits.map((r) => (r.created_by as string | null) ?? null)
	];
	const testers = tested.length ? tested : [job.assigneeId];
	const facts: ReportFacts = {
		jobNumber: job.number,
		complaint: job.complaint,
		codesBefore: job.codesBefore ?? [],
		codesAfter: job.codesAfter ?? [],
		customerName: customer?.name ?? null,
		vehicle: vehicle
			? {
					make: vehicle.make,
					model: vehicle.model,
					year: vehicle.year,
					plate: vehicle.plate,
					vin: vehicle.vin,
					odometer: vehicle.odometer,
					odometerUnit: vehicle.odometerUnit
				}
			: null,
		workshop: { name: settings.workshopName, address: settings.address, phone: settings.phone, email: settings.email },
		technicians: [...new Set(testers.filter((id): id is string => !!id).map((id) => names.get(id) ?? 'A former colleague'))],
		tests: tests.map(({ technicianId: _t, id: _i, ...t }) => t),
		sparks: latestBy(sparks, (s) => String(s.position)).map((s) => ({
			position: String(s.position),
			gapMm: Number(s.gap_mm),
			outcome: s.outcome as 'go' | 'weak' | 'none'
		})),
		swaps: swaps.map((s) => ({
			fromPosition: String(s.from_position),
			toPosition: String(s.to_position),
			conclusion: s.conclusion as 'fault_followed' | 'fault_stayed' | 'inconclusive'
		})),
		circuits,
		workDone: notes.workDone ?? null,
		recommendations: notes.recommendations,
		photos,
		date: isoDayIn(now, settings.timeZone),
		timeZone: settings.timeZone
	};
	return { facts, awaitingSignOff: all.length - tests.length + awaitingCircuits(circuitStates) };
}
