/**
 * The capture screen's state: which cell is open, what is typed per cell (kept across a
 * reload by `draft.ts`), which caution sets were acknowledged in this test, and the actions
 * (type, add a sample, save, read the leads again, finish). The decisions are the pure
 * functions of `$lib/flow`; the writes go through `io`, so the class is tested without a
 * browser (tests/unit/flow/capture-state.test.ts).
 */
import { cautionsFor } from '$lib/flow/cautions';
import {
	cellsFor,
	compareRows,
	entrySample,
	latestByCell,
	leadsAge,
	pickRange,
	serverDisagreements,
	startUnit,
	viewReading,
	type CellDraft,
	type FlowCheck,
	type SavedReading,
	type TestMeter
} from '$lib/flow/capture';
import type { CoilPosition } from '$lib/flow/decisions';
import type { TemperatureSnapshot, VisualFinding } from '$lib/flow/reading';
import type { TestDraft } from './draft';

export type CaptureData = {
	test: { id: string; data: Record<string, unknown> };
	job: { id: string; vehicle: { hybrid: boolean } | null };
	sheet: { checks: FlowCheck[] };
	part: { cautions: string[]; positions: CoilPosition[] } | null;
	readings: (SavedReading & { updatedAt: string })[];
};

/** The writes the screen makes (the phone's outbox in the app, a fake in tests). */
export type CaptureIO = {
	saveReading(fields: Record<string, unknown>): Promise<void>;
	patchTest(fields: Record<string, unknown>): Promise<void>;
	keepDraft(draft: TestDraft): void;
	now?: () => number;
};

export class Capture {
	private readonly data: () => CaptureData;
	private readonly io: CaptureIO;
	index = $state(0);
	drafts = $state<Record<string, CellDraft>>({});
	/** Caution lines acknowledged in this test (a card whose lines all are folds to one line). */
	acked = $state<string[]>([]);
	/** A folded caution opened again by a tap. */
	cautionOpen = $state(false);
	/** The "read the leads again" form, and what is typed in it. */
	leadsForm = $state<string | null>(null);
	busy = $state(false);
	/** The time the lead reading's age is told against (moved on by `tick`). */
	clock = $state(0);

	constructor(
		data: () => CaptureData,
		io: CaptureIO,
		draft: TestDraft = { index: 0, cells: {}, acked: [] }
	) {
		this.data = data;
		this.io = io;
		this.clock = (io.now ?? Date.now)();
		this.index = Math.max(0, Math.min(draft.index, 1000));
		this.drafts = draft.cells ?? {};
		this.acked = draft.acked ?? [];
	}

	readonly meter = $derived.by(() => this.data().test.data.meter as TestMeter);
	readonly temperature = $derived.by(
		() => this.data().test.data.temperature as TemperatureSnapshot
	);
	readonly hybrid = $derived.by(() => Boolean(this.data().job.vehicle?.hybrid));
	readonly coils = $derived.by(() => this.data().part?.positions ?? []);
	readonly positions = $derived.by(() =>
		String(this.data().test.data.position ?? '1')
			.split(',')
			.filter(Boolean)
	);
	readonly cells = $derived.by(() =>
		cellsFor(this.positions, this.data().sheet.checks, this.coils)
	);
	readonly done = $derived.by(() => this.index >= this.cells.length);
	readonly cell = $derived.by(() => this.cells[Math.min(this.index, this.cells.length - 1)]);
	readonly saved = $derived.by(() => latestByCell(this.data().readings));

	readonly draft = $derived.by<CellDraft>(
		() =>
			this.drafts[this.cell.key] ?? {
				entry: '',
				unit: startUnit(this.cell.check),
				samples: [],
				rangeLabel: pickRange(this.meter, this.cell.check),
				visual: null
			}
	);
	readonly view = $derived.by(() =>
		viewReading(this.cell, this.draft, this.meter, this.temperature, this.locale())
	);
	readonly caution = $derived.by(() =>
		cautionsFor({
			step: 'check',
			hybrid: this.hybrid,
			partCautions: this.data().part?.cautions ?? [],
			condition: this.cell.check.condition,
			quantity: this.cell.check.quantity,
			hot: this.temperature?.mode === 'just_run'
		})
	);
	/** Every line of the step's caution was acknowledged (or seen, for ones that need no tap) in this test. */
	readonly acknowledged = $derived.by(() => this.caution.list.every((l) => this.acked.includes(l.id)));
	/** Whether the caution shows folded to one line (a tap opens it again). */
	readonly folded = $derived.by(() => this.acknowledged && !this.cautionOpen);
	/** Save waits for a high-risk caution's tap and for a result that may be saved. */
	readonly canSave = $derived.by(() => this.view.canSave && (!this.caution.needsTap || this.acknowledged));
	readonly leadsAge = $derived.by(() => leadsAge(this.meter.leadReadAt, this.clock));
	readonly rows = $derived.by(() =>
		compareRows(this.data().sheet.checks, this.positions, this.saved, this.meter, this.temperature)
	);
	readonly server = $derived.by(() =>
		serverDisagreements(this.saved, this.cells, this.meter, this.temperature)
	);

	private locale() {
		return typeof navigator === 'undefined' ? 'en' : navigator.language || 'en';
	}

	private keep() {
		this.io.keepDraft({
			index: this.index,
			cells: $state.snapshot(this.drafts),
			acked: [...this.acked]
		});
	}

	private update(patch: Partial<CellDraft>) {
		this.drafts[this.cell.key] = { ...this.draft, ...patch };
		this.keep();
	}

	tick() {
		this.clock = (this.io.now ?? Date.now)();
	}
	open(i: number) {
		this.index = Math.max(0, Math.min(i, this.cells.length));
		this.cautionOpen = false;
		this.keep();
	}
	type(entry: string) {
		this.update({ entry });
	}
	setUnit(unit: string) {
		this.update({ unit });
	}
	setRange(rangeLabel: string) {
		this.update({ rangeLabel });
	}
	setVisual(visual: VisualFinding) {
		this.update({ visual });
	}
	/** Keep what is typed as a sample and clear the entry for the next one. */
	addSample() {
		const s = entrySample(this.draft);
		if (!s) return;
		this.update({ samples: [...this.draft.samples, s], entry: '' });
	}
	acknowledge(on = true) {
		const ids: string[] = this.caution.list.map((l) => l.id);
		this.acked = on ? [...new Set([...this.acked, ...ids])] : this.acked.filter((k) => !ids.includes(k));
		this.cautionOpen = false;
		this.keep();
	}

	/** Save the cell's reading (queued to send) and go to the next cell. */
	async save() {
		const v = this.view;
		if (!v.result || !v.key || !this.canSave || this.busy) return;
		const cell = this.cell;
		const typed = entrySample(this.draft);
		const samples =
			cell.check.quantity === 'visual'
				? []
				: typed
					? [...this.draft.samples, typed]
					: this.draft.samples;
		const value = v.result.value;
		// A caution shown in full at this reading has been read once it is saved.
		const read = this.caution.needsTap ? [] : this.caution.list.map((l) => l.id);
		// The next cell opens at once, so keys pressed while the reading is stored go to the
		// next cell, not into the one being saved; it comes back if the store fails.
		const draft = this.drafts[cell.key];
		const { visual, rangeLabel } = this.draft;
		const index = this.index;
		delete this.drafts[cell.key];
		this.index = Math.min(this.index + 1, this.cells.length);
		this.cautionOpen = false;
		this.busy = true;
		try {
			await this.io.saveReading({
				testId: this.data().test.id,
				checkKey: cell.check.key,
				position: cell.position,
				samples,
				...(cell.check.quantity === 'visual'
					? { visual }
					: { rangeLabel }),
				deviceResult: {
					value: value === Infinity ? null : value,
					verdict: v.result.verdict,
					...(value === Infinity ? { ol: true } : {})
				}
			});
			// …so it folds from now on.
			this.acked = [...new Set([...this.acked, ...read])];
			this.keep();
		} catch (e) {
			if (draft) this.drafts[cell.key] = draft;
			this.index = index;
			this.keep();
			throw e;
		} finally {
			this.busy = false;
		}
	}

	/** Record a new lead reading on the test (the leads changed, or a bad zero was shown). */
	async rereadLeads(ohms: number) {
		const m = this.meter;
		const at = new Date((this.io.now ?? Date.now)()).toISOString();
		const meter = m.relativeMode
			? { ...m, zeroReading: ohms, leadReadAt: at }
			: { ...m, leadResistance: ohms, leadReadAt: at };
		await this.io.patchTest({ meter });
		this.tick();
		this.leadsForm = null;
		// What was typed against the old lead reading is read again.
		this.update({ entry: '', samples: [] });
	}

	async finish() {
		await this.io.patchTest({ state: 'done' });
	}
}
