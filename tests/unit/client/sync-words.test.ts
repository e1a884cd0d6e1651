import { describe, expect, it } from 'vitest';
import { ENTITY_WORDS, fieldsInWords, PROBLEM_WORDS, reasonInWords } from '../../../src/lib/client/sync-words';
import { ENTITIES } from '../../../src/lib/sync/protocol';
import { jobCreate } from '../../../src/lib/schemas/job';
import { vehicleFields } from '../../../src/lib/schemas/vehicle';
import { customerCreate } from '../../../src/lib/schemas/customer';
import { testCreate } from '../../../src/lib/schemas/test';

describe('the sync screen’s words', () => {
	it('names every kind of record, a component as a part', () => {
		for (const e of ENTITIES) expect(ENTITY_WORDS[e], e).toBeTruthy();
		expect(ENTITY_WORDS.component).toBe('Part');
	});

	it('says the fields of a change in words, never their codes', () => {
		expect(fieldsInWords({ codesBefore: [], assigneeId: 'x' })).toBe('fault codes before, who it is assigned to');
		const every = [jobCreate, vehicleFields, customerCreate, testCreate].flatMap((s) => Object.keys(s.shape));
		const words = fieldsInWords(Object.fromEntries(every.map((k) => [k, 1])));
		for (const k of every) if (/[A-Z]/.test(k)) expect(words, k).not.toContain(k);
		expect(words).not.toContain('other details');
	});

	it('never shows a server’s text for a refusal', () => {
		expect(reasonInWords('invalid')).toBe('some of it was not accepted; check what you entered');
		expect(reasonInWords('something_new')).toBe('the workshop did not take it; the lead can see why');
	});

	it('says every reason a sync stops in a plain sentence', () => {
		for (const text of Object.values(PROBLEM_WORDS)) expect(text).toMatch(/^[A-Z][^_]*\.$/);
	});
});
