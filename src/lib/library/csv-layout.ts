/**
 * Fieldbench's own CSV layout for the spec library. One header line names the columns
 * (`CSV_COLUMNS`); every other line is one record whose first cell says what it is:
 *
 *   component  part_number kind description cautions
 *   fits       part_number make model year_from year_to engine_code     (one per vehicle)
 *   coil       part_number position cylinders                           (one per coil of a pack)
 *   sheet      part_number sheet_version state source_document source_section source_page
 *   check      part_number sheet_version check_key check_label quantity terminal_from
 *              terminal_to condition range_hint unit open_ok position
 *              (position: the pack's coil the check belongs to; empty for every coil)
 *   limits     part_number sheet_version check_key from_c to_c min max  (one per band)
 *
 * Cells a record does not use stay empty. `min`/`max` are in the check's `unit`; `from_c`
 * and `to_c` in °C, empty meaning unbounded. Lists (cautions, cylinders) are separated by
 * spaces. Files separated by `;` use decimal commas; `,` files use points; both are read.
 * Text that a spreadsheet would run as a formula is written with a leading `'` (OWASP,
 * "CSV Injection") and read back without it. Pure: parsing and validation, no database.
 */
import { parseDecimal } from '../domain/units';
import { guardFormula, parseCsv, unguardFormula, writeCsv, type Delimiter } from '../csv';
import { componentCreate, sheetCreate, type Check, type ComponentKind } from '../schemas/component';
import { limitFromBase, limitToBase, plainNumber } from './limits';

export const CSV_COLUMNS = [
	'record',
	'part_number',
	'kind',
	'description',
	'cautions',
	'make',
	'model',
	'year_from',
	'year_to',
	'engine_code',
	'position',
	'cylinders',
	'sheet_version',
	'state',
	'source_document',
	'source_section',
	'source_page',
	'check_key',
	'check_label',
	'quantity',
	'terminal_from',
	'terminal_to',
	'condition',
	'range_hint',
	'unit',
	'open_ok',
	'from_c',
	'to_c',
	'min',
	'max'
] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];

export const RECORD_COLUMNS = {
	component: ['part_number', 'kind', 'description', 'cautions'],
	fits: ['part_number', 'make', 'model', 'year_from', 'year_to', 'engine_code'],
	coil: ['part_number', 'position', 'cylinders'],
	sheet: [
		'part_number',
		'sheet_version',
		'state',
		'source_document',
		'source_section',
		'source_page'
	],
	check: [
		'part_number',
		'sheet_version',
		'check_key',
		'check_label',
		'quantity',
		'terminal_from',
		'terminal_to',
		'condition',
		'range_hint',
		'unit',
		'open_ok',
		'position'
	],
	limits: ['part_number', 'sheet_version', 'check_key', 'from_c', 'to_c', 'min', 'max']
} as const satisfies Record<string, readonly CsvColumn[]>;
export type RecordType = keyof typeof RECORD_COLUMNS;

/** Free-text columns: guarded against spreadsheet formulas on the way out. */
const TEXT_COLUMNS = new Set<CsvColumn>([
	'part_number',
	'description',
	'make',
	'model',
	'engine_code',
	'position',
	'source_document',
	'source_section',
	'source_page',
	'check_label',
	'terminal_from',
	'terminal_to',
	'range_hint'
]);
const guard = guardFormula;
const unguard = unguardFormula;

/** A component as the library stores it (the API's record, limits in base units). */
export type LibraryComponent = {
	partNumber: string;
	kind: ComponentKind | string;
	description?: string | null;
	cautions?: string[] | null;
	fitment?:
		| {
				make: string;
				model: string;
				yearFrom?: number | null;
				yearTo?: number | null;
				engineCode?: string | null;
		  }[]
		| null;
	positions?: { position: string; cylinders: number[] }[] | null;
};
export type LibrarySheet = {
	sheetVersion: number;
	state: 'draft' | 'approved';
	checks: Check[];
	source?: { document?: string | null; section?: string | null; page?: string | null } | null;
};
export type LibraryEntry = { component: LibraryComponent; sheets: LibrarySheet[] };

type Cells = Partial<Record<CsvColumn, string>>;
const line = (record: RecordType, cells: Cells) =>
	CSV_COLUMNS.map((c) => {
		if (c === 'record') return record;
		const v = cells[c] ?? '';
		return TEXT_COLUMNS.has(c) ? guard(v) : v;
	});
const text = (v: unknown) => (v === null || v === undefined ? '' : String(v));

/** The CSV lines of one sheet (without the header). */
export function sheetLines(partNumber: string, s: LibrarySheet, decimalComma = false): string[][] {
	const num = (n: number | null | undefined) => (n == null ? '' : plainNumber(n, decimalComma));
	const v = String(s.sheetVersion);
	const out = [
		line('sheet', {
			part_number: partNumber,
			sheet_version: v,
			state: s.state,
			source_document: text(s.source?.document),
			source_section: text(s.source?.section),
			source_page: text(s.source?.page)
		})
	];
	for (const c of s.checks) {
		out.push(
			line('check', {
				part_number: partNumber,
				sheet_version: v,
				check_key: c.key,
				check_label: c.label,
				quantity: c.quantity,
				terminal_from: text(c.from),
				terminal_to: text(c.to),
				condition: c.condition,
				range_hint: text(c.rangeHint),
				unit: text(c.unit),
				open_ok: c.openOk ? 'yes' : 'no',
				position: text(c.coil)
			})
		);
		for (const b of c.bands)
			out.push(
				line('limits', {
					part_number: partNumber,
					sheet_version: v,
					check_key: c.key,
					from_c: num(b.fromC),
					to_c: num(b.toC),
					min: num(b.min === null ? null : limitFromBase(b.min, c.unit)),
					max: num(b.max === null ? null : limitFromBase(b.max, c.unit))
				})
			);
	}
	return out;
}

/** The whole file: header, then per component its fitment, coils, sheets, checks and limits. */
export function writeLibraryCsv(entries: LibraryEntry[], delimiter: ',' | ';' = ','): string {
	const comma = delimiter === ';';
	const rows: string[][] = [[...CSV_COLUMNS]];
	for (const { component: c, sheets } of entries) {
		const pn = c.partNumber;
		rows.push(
			line('component', {
				part_number: pn,
				kind: c.kind,
				description: text(c.description),
				cautions: (c.cautions ?? []).join(' ')
			})
		);
		for (const f of c.fitment ?? [])
			rows.push(
				line('fits', {
					part_number: pn,
					make: f.make,
					model: f.model,
					year_from: text(f.yearFrom),
					year_to: text(f.yearTo),
					engine_code: text(f.engineCode)
				})
			);
		for (const p of c.positions ?? [])
			rows.push(
				line('coil', { part_number: pn, position: p.position, cylinders: p.cylinders.join(' ') })
			);
		for (const s of [...sheets].sort((a, b) => a.sheetVersion - b.sheetVersion))
			rows.push(...sheetLines(pn, s, comma));
	}
	return '\uFEFF' + writeCsv(rows, delimiter as Delimiter);
}

// ---------------------------------------------------------------------------------------
// Reading

/** A problem in the file at a 1-based line and a column (its header name). */
export type CsvIssue = { line: number; column: string; message: string };

type Row = { line: number; get: (c: CsvColumn) => string };
type SheetGroup = { row?: Row; version: number; checks: Row[]; limits: Row[] };
type Group = {
	first: Row;
	component?: Row;
	fits: Row[];
	coils: Row[];
	sheets: Map<number, SheetGroup>;
};

/** What one component of the file turns into, validated by the shared schemas. */
export type ImportEntry = {
	partNumber: string;
	line: number;
	component: ReturnType<typeof componentCreate.parse>;
	sheets: {
		sheetVersion: number;
		state: 'draft' | 'approved';
		line: number;
		checks: Check[];
		source: LibrarySheet['source'];
	}[];
};

const PLACEHOLDER_ID = '00000000-0000-7000-8000-000000000000';
const MAX_ISSUES = 100;

const FITMENT_COLUMNS: Record<string, CsvColumn> = {
	make: 'make',
	model: 'model',
	yearFrom: 'year_from',
	yearTo: 'year_to',
	engineCode: 'engine_code'
};
const CHECK_COLUMNS: Record<string, CsvColumn> = {
	key: 'check_key',
	label: 'check_label',
	quantity: 'quantity',
	from: 'terminal_from',
	to: 'terminal_to',
	condition: 'condition',
	rangeHint: 'range_hint',
	unit: 'unit',
	openOk: 'open_ok',
	coil: 'position',
	bands: 'check_key'
};
const BAND_COLUMNS: Record<string, CsvColumn> = {
	fromC: 'from_c',
	toC: 'to_c',
	min: 'min',
	max: 'max'
};
const COMPONENT_COLUMNS: Record<string, CsvColumn> = {
	partNumber: 'part_number',
	kind: 'kind',
	description: 'description',
	cautions: 'cautions',
	fitment: 'part_number',
	positions: 'part_number'
};

/**
 * Read a library file: every line is checked (structure, record type, cells, then each
 * component and sheet against the shared zod schemas) and every problem is reported with
 * its line and column. `entries` is only meaningful when `issues` is empty.
 */
export function readLibraryCsv(input: string): { entries: ImportEntry[]; issues: CsvIssue[] } {
	const issues: CsvIssue[] = [];
	const at = (line: number, column: string, message: string) => {
		if (issues.length < MAX_ISSUES) issues.push({ line, column, message });
	};
	const { rows, problems } = parseCsv(input);
	const [header, ...body] = rows;
	if (!header)
		return { entries: [], issues: [{ line: 1, column: '', message: 'The file is empty' }] };

	const names = header.cells.map((c) => c.trim().toLowerCase());
	const colName = (n: number) => names[n - 1] || `cell ${n}`;
	for (const p of problems) at(p.line, colName(p.column), p.message);
	const index = new Map<CsvColumn, number>();
	names.forEach((n, i) => {
		if (!(CSV_COLUMNS as readonly string[]).includes(n))
			at(header.line, n || `cell ${i + 1}`, 'Unknown column');
		else if (index.has(n as CsvColumn)) at(header.line, n, 'This column appears twice');
		else index.set(n as CsvColumn, i);
	});
	for (const required of ['record', 'part_number'] as const)
		if (!index.has(required)) at(header.line, required, 'Missing column');
	if (issues.length) return { entries: [], issues };

	const groups = new Map<string, Group>();
	for (const r of body) readRow(r, names, index, groups, at);
	const entries: ImportEntry[] = [];
	for (const g of groups.values()) {
		const e = buildEntry(g, at);
		if (e) entries.push(e);
	}
	issues.sort((a, b) => a.line - b.line);
	return { entries, issues };
}

function readRow(
	r: { line: number; cells: string[] },
	names: string[],
	index: Map<CsvColumn, number>,
	groups: Map<string, Group>,
	at: (line: number, column: string, message: string) => void
) {
	if (r.cells.length > names.length) {
		at(
			r.line,
			`cell ${names.length + 1}`,
			`${r.cells.length} cells, but the header has ${names.length}`
		);
		return;
	}
	const get = (c: CsvColumn) => {
		const i = index.get(c);
		const v = i === undefined ? '' : (r.cells[i] ?? '');
		return TEXT_COLUMNS.has(c) ? unguard(v) : v;
	};
	const row: Row = { line: r.line, get };
	const record = get('record').trim().toLowerCase() as RecordType;
	if (!Object.hasOwn(RECORD_COLUMNS, record)) {
		at(r.line, 'record', `One of: ${Object.keys(RECORD_COLUMNS).join(', ')}`);
		return;
	}
	const used = RECORD_COLUMNS[record] as readonly CsvColumn[];
	for (const [c] of index)
		if (c !== 'record' && !used.includes(c) && get(c).trim() !== '')
			at(r.line, c, `Not used on a ${record} line; leave it empty`);
	const pn = get('part_number').trim();
	if (!pn) return at(r.line, 'part_number', 'Enter the part number');
	const key = pn.toUpperCase();
	const g: Group = groups.get(key) ?? { first: row, fits: [], coils: [], sheets: new Map() };
	groups.set(key, g);
	if (record === 'component') {
		if (g.component) return at(r.line, 'part_number', `A second component line for ${pn}`);
		g.component = row;
		return;
	}
	if (record === 'fits') return void g.fits.push(row);
	if (record === 'coil') return void g.coils.push(row);
	const version = wholeNumber(get('sheet_version'));
	if (version === null || version < 1)
		return at(r.line, 'sheet_version', 'A sheet version like 1, 2, 3');
	const s: SheetGroup = g.sheets.get(version) ?? { version, checks: [], limits: [] };
	g.sheets.set(version, s);
	if (record === 'sheet') {
		if (s.row) return at(r.line, 'sheet_version', `A second sheet line for version ${version}`);
		s.row = row;
	} else if (record === 'check') s.checks.push(row);
	else s.limits.push(row);
}

const wholeNumber = (s: string) => (/^\s*\d{1,9}\s*$/.test(s) ? Number(s) : null);
const blankToNull = (s: string) => (s.trim() === '' ? null : s);

function buildEntry(
	g: Group,
	at: (line: number, column: string, message: string) => void
): ImportEntry | null {
	const c = g.component;
	if (!c) {
		at(g.first.line, 'part_number', `No component line for ${g.first.get('part_number').trim()}`);
		return null;
	}
	let ok = true;
	const bad = (row: Row, column: CsvColumn, message: string) => {
		ok = false;
		at(row.line, column, message);
	};
	const year = (row: Row, column: CsvColumn) => {
		const v = row.get(column).trim();
		if (v === '') return null;
		const n = wholeNumber(v);
		if (n === null) bad(row, column, 'A year like 2019');
		return n;
	};
	const component = {
		partNumber: c.get('part_number'),
		kind: c.get('kind').trim(),
		description: c.get('description'),
		cautions: c
			.get('cautions')
			.split(/[\s+|]+/)
			.filter(Boolean),
		fitment: g.fits.map((f) => ({
			make: f.get('make'),
			model: f.get('model'),
			yearFrom: year(f, 'year_from'),
			yearTo: year(f, 'year_to'),
			engineCode: f.get('engine_code')
		})),
		positions: g.coils.map((p) => {
			const list = p
				.get('cylinders')
				.split(/[\s+,;/]+/)
				.filter(Boolean);
			if (list.some((x) => wholeNumber(x) === null))
				bad(p, 'cylinders', 'Cylinder numbers like 1 4');
			return { position: p.get('position'), cylinders: list.map((x) => wholeNumber(x) ?? 0) };
		})
	};
	const parsed = componentCreate.safeParse(component);
	if (!parsed.success)
		for (const issue of parsed.error.issues) {
			const [field, i, sub] = issue.path as (string | number)[];
			const list = field === 'fitment' ? g.fits : field === 'positions' ? g.coils : null;
			const row = list && typeof i === 'number' ? list[i] : c;
			const column =
				field === 'fitment' && row !== c
					? (FITMENT_COLUMNS[String(sub)] ?? 'make')
					: field === 'positions' && row !== c
						? sub === 'position'
							? 'position'
							: 'cylinders'
						: (COMPONENT_COLUMNS[String(field)] ?? 'part_number');
			bad(row, column, issue.message);
		}

	const sheets: ImportEntry['sheets'] = [];
	for (const s of [...g.sheets.values()].sort((a, b) => a.version - b.version)) {
		const built = buildSheet(s, bad);
		if (built) sheets.push(built);
	}
	if (!ok || !parsed.success) return null;
	return { partNumber: parsed.data.partNumber, line: c.line, component: parsed.data, sheets };
}

function buildSheet(
	s: SheetGroup,
	bad: (row: Row, column: CsvColumn, message: string) => void
): ImportEntry['sheets'][number] | null {
	const head = s.row;
	if (!head) {
		const first = s.checks[0] ?? s.limits[0];
		bad(first, 'sheet_version', `No sheet line for version ${s.version}`);
		return null;
	}
	const state = head.get('state').trim().toLowerCase();
	if (state !== 'draft' && state !== 'approved') bad(head, 'state', 'One of: draft, approved');
	const checkRows = s.checks;
	const bandRows: Row[][] = checkRows.map(() => []);
	for (const l of s.limits) {
		const i = checkRows.findIndex((c) => c.get('check_key').trim() === l.get('check_key').trim());
		if (i < 0) bad(l, 'check_key', `No check line with this key in version ${s.version}`);
		else bandRows[i].push(l);
	}
	const decimal = (row: Row, column: CsvColumn) => {
		const v = row.get(column);
		if (v.trim() === '') return null;
		const n = parseDecimal(v);
		if (n === null) bad(row, column, `Not a number: “${v.trim()}”`);
		return n;
	};
	const checks = checkRows.map((row, i) => {
		const unit = row.get('unit').trim();
		const open = row.get('open_ok').trim().toLowerCase();
		if (!['', 'yes', 'no', 'true', 'false', '1', '0'].includes(open))
			bad(row, 'open_ok', 'yes or no');
		return {
			key: row.get('check_key').trim(),
			label: row.get('check_label'),
			quantity: row.get('quantity').trim(),
			from: row.get('terminal_from'),
			to: row.get('terminal_to'),
			condition: row.get('condition').trim(),
			rangeHint: row.get('range_hint'),
			unit: blankToNull(unit),
			openOk: ['yes', 'true', '1'].includes(open),
			coil: row.get('position'),
			bands: bandRows[i].map((b) => {
				const min = decimal(b, 'min');
				const max = decimal(b, 'max');
				return {
					fromC: decimal(b, 'from_c'),
					toC: decimal(b, 'to_c'),
					min: min === null ? null : limitToBase(min, unit),
					max: max === null ? null : limitToBase(max, unit)
				};
			})
		};
	});
	const source = {
		document: head.get('source_document'),
		section: head.get('source_section'),
		page: head.get('source_page')
	};
	const parsed = sheetCreate.safeParse({ componentId: PLACEHOLDER_ID, checks, source });
	if (!parsed.success) {
		for (const issue of parsed.error.issues) {
			const [field, i, sub, j, bandField] = issue.path as (string | number)[];
			if (field === 'source') bad(head, `source_${String(i)}` as CsvColumn, issue.message);
			else if (field !== 'checks' || typeof i !== 'number')
				bad(head, 'sheet_version', issue.message);
			else if (sub === 'bands' && typeof j === 'number')
				bad(bandRows[i][j], BAND_COLUMNS[String(bandField)] ?? 'min', issue.message);
			else bad(checkRows[i], CHECK_COLUMNS[String(sub)] ?? 'check_key', issue.message);
		}
		return null;
	}
	return {
		sheetVersion: s.version,
		state: state as 'draft' | 'approved',
		line: head.line,
		checks: parsed.data.checks,
		source: parsed.data.source
	};
}
