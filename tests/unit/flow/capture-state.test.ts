/**
 * The capture screen's state, without a browser: what is typed per cell, saving, reading the
 * leads again, and the caution that folds once acknowledged. Figures: the demo coil's
 * invented cold spec 0.38–0.58 Ω; meter accuracy ±(% of reading + counts).
 */
import { describe, expect, it } from 'vitest';
import { Capture, type CaptureData } from '../../../src/routes/(app)/field/job/[id]/test/[testId]/capture.svelte';

const PRIMARY = { key: 'primary', label: 'Primary winding', quantity: 'resistance', unit: 'Ω', openOk: false, condition: 'key_off', bands: [{ fromC: null, toC: 50, min: 0.38, max: 0.58 }] };
const METER = {
	name: 'Example',
	ranges: [
		{ label: '20 Ω', resolution: 0.01, pctOfReading: 0.5, counts: 2, maxReading: 19.99 },
		{ label: '20 kΩ', resolution: 10, pctOfReading: 0.8, counts: 1, maxReading: 19990 }
	],
	leadResistance: 0.2,
	relativeMode: false,
	leadReadAt: '2026-12-02T08:00:00.000Z'
};

function setup({ hybrid = false, meter = METER, failSave = false } = {}) {
	const data: CaptureData = {
		test: { id: 't1', data: { meter, temperature: { mode: 'overnight' }, position: '1,2' } },
		job: { id: 'j1', vehicle: { hybrid } },
		sheet: { checks: [PRIMARY] },
		part: { cautions: [], positions: [] },
		readings: []
	};
	const saved: Record<string, unknown>[] = [];
	const patches: Record<string, unknown>[] = [];
	const drafts: unknown[] = [];
	const c = new Capture(() => data, {
		saveReading: async (f) => {
			if (failSave) throw new Error('storage full');
			saved.push(f);
		},
		patchTest: async (f) => {
			patches.push(f);
			Object.assign(data.test.data, f); // as the page's reload would
		},
		keepDraft: (d) => void drafts.push(d),
		now: () => Date.parse('2026-12-02T08:12:00.000Z')
	});
	return { c, saved, patches, drafts };
}

describe('the capture screen’s state', () => {
	it('opens on the first cell, on the finest Ω range, with the leads read 12 min ago', () => {
		const { c } = setup();
		expect(c.cell.label).toBe('Cylinder 1 · Primary winding');
		expect(c.draft.rangeLabel).toBe('20 Ω');
		expect(c.leadsAge).toBe('12 min ago');
	});

	it('does not save 0.15 Ω read with 0.20 Ω leads, and asks for the leads again', async () => {
		const { c, saved } = setup();
		c.type('0,15');
		expect(c.view.text).toBe('Can’t tell — re-zero the leads');
		expect(c.canSave).toBe(false);
		await c.save();
		expect(saved).toEqual([]);
		expect(c.index).toBe(0);
	});

	it('keeps the new lead reading on the test, with when, and clears what was typed against the old one', async () => {
		const { c, patches } = setup();
		c.type('0,15');
		await c.rereadLeads(0.12);
		expect(patches[0]).toEqual({ meter: { ...METER, leadResistance: 0.12, leadReadAt: '2026-12-02T08:12:00.000Z' } });
		expect(c.draft.entry).toBe('');
		c.type('0,58'); // 0.58 − 0.12 = 0.46 Ω ± (0.0229 + 0.0206)
		expect(c.view.key).toBe('within');
		expect(c.canSave).toBe(true);
	});

	it('saves a reading with its samples, range and the phone’s result, then moves on', async () => {
		const { c, saved } = setup();
		c.type('0,68');
		c.addSample();
		c.type('0,66');
		await c.save();
		expect(saved).toHaveLength(1);
		expect(saved[0]).toMatchObject({
			testId: 't1',
			checkKey: 'primary',
			position: '1',
			samples: [
				{ value: 0.68, unit: 'Ω' },
				{ value: 0.66, unit: 'Ω' }
			],
			rangeLabel: '20 Ω',
			deviceResult: { verdict: 'within' }
		});
		expect((saved[0].deviceResult as { value: number }).value).toBeCloseTo(0.46, 12);
		expect(c.cell.label).toBe('Cylinder 2 · Primary winding');
	});

	it('takes keys pressed while a reading is being stored into the next cell', async () => {
		const { c, saved } = setup();
		c.open(1);
		c.setRange('20 kΩ'); // the next cell's own choice, which must not leak into this reading
		c.open(0);
		c.type('0,68');
		const saving = c.save(); // still storing
		expect(c.cell.label).toBe('Cylinder 2 · Primary winding');
		c.type('0,6');
		await saving;
		expect(saved[0]).toMatchObject({ samples: [{ value: 0.68, unit: 'Ω' }], rangeLabel: '20 Ω' });
		expect(c.draft).toMatchObject({ entry: '0,6', rangeLabel: '20 kΩ' });
	});

	it('gives the reading back, typed as it was, when storing it fails', async () => {
		const { c } = setup({ failSave: true });
		c.type('0,68');
		await expect(c.save()).rejects.toThrow('storage full');
		expect(c.cell.label).toBe('Cylinder 1 · Primary winding');
		expect(c.draft.entry).toBe('0,68');
	});

	it('folds a caution that needs no tap once a reading was saved under it', async () => {
		const { c } = setup();
		expect(c.folded).toBe(false);
		c.type('0,68');
		await c.save();
		expect(c.folded).toBe(true); // the same key-off caution at cylinder 2
		c.cautionOpen = true;
		expect(c.folded).toBe(false); // a tap opens it again
	});

	it('holds Save on a hybrid until the high-voltage caution is ticked, then folds it', () => {
		const { c } = setup({ hybrid: true });
		c.type('0,68');
		expect(c.caution.needsTap).toBe(true);
		expect(c.canSave).toBe(false);
		c.acknowledge();
		expect(c.canSave).toBe(true);
		expect(c.folded).toBe(true);
	});

	it('keeps what is typed for a reload, with the acknowledged cautions', () => {
		const { c, drafts } = setup({ hybrid: true });
		c.type('0,6');
		c.acknowledge();
		expect(drafts.at(-1)).toMatchObject({ index: 0, cells: { '1|primary': { entry: '0,6' } }, acked: c.caution.list.map((l) => l.id) });
	});
});

describe('a caution card across cells', () => {
	it('opens in full again only for lines not yet acknowledged in this test', async () => {
		const { c } = setup();
		c.acknowledge();
		expect(c.folded).toBe(true);
		// A line never acknowledged (a part's own caution, say) brings the card back in full.
		c.acked = c.acked.filter((id) => id !== 'own_pins');
		expect(c.folded).toBe(false);
	});
});
