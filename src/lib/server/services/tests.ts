/**
 * Tests on the one write path. A test pins its snapshot: the approved sheet version, the
 * meter and the temperature; its technician is whoever started it (never taken from a
 * client), and so is whether it needs a lead's sign-off (an apprentice started it). Who may
 * start or change one is the rulebook's (`testRules` in `rules.ts`): a job the actor sees, an
 * approved sheet of the component, never an airbag component, no apprentice on a hybrid or
 * electric vehicle, a re-test linked to the first test of the same part and positions.
 */
import { testCreate, testPatch } from '../../schemas/test';
import { SpecSheet, Test } from '../db/models';
import { testRecord } from '../db/records';
import { testRules } from './rules';
import { defineAggregate } from './write-path';

export const tests = defineAggregate({
	entity: 'test',
	model: Test,
	createSchema: testCreate,
	patchSchema: testPatch,
	rules: testRules,
	serverOwned: ['technicianId', 'needsSignOff'],
	prepareCreate: async (actor, f, t) => {
		const sheet = f.sheetId
			? await SpecSheet.findOne({ where: { id: f.sheetId, workshopId: actor.workshopId }, transaction: t })
			: null;
		return {
			...f,
			technicianId: actor.userId,
			// An apprentice's test waits for a lead's sign-off (DESIGN §6).
			needsSignOff: actor.role === 'apprentice',
			...(sheet ? { sheetVersion: sheet.sheetVersion } : {})
		};
	},
	jobIdOf: (r) => r.get('jobId') as string,
	toRecord: testRecord
});
