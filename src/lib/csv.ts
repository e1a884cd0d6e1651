/**
 * A small CSV reader and writer (RFC 4180 quoting): cells separated by `,`, `;` or a tab;
 * a cell that starts with `"` runs to the next lone `"` and may hold separators, line breaks
 * and doubled quotes (`""`). Lines end with CRLF, LF or CR. A leading byte-order mark is
 * ignored. Pure: no I/O.
 */

export type Delimiter = ',' | ';' | '\t';
/** One record and the 1-based line of the file it starts on. */
export type CsvRow = { line: number; cells: string[] };
/** Something wrong with the file's structure, at a 1-based line and cell number. */
export type CsvProblem = { line: number; column: number; message: string };

const DELIMITERS: Delimiter[] = [',', ';', '\t'];

/** The delimiter of the first line: the most frequent of `,` `;` tab outside quotes (`,` on a tie). */
export function detectDelimiter(text: string): Delimiter {
	const counts = new Map<string, number>();
	let quoted = false;
	for (const ch of text.replace(/^\uFEFF/, '')) {
		if (ch === '"') quoted = !quoted;
		else if (!quoted && (ch === '\n' || ch === '\r')) break;
		else if (!quoted && DELIMITERS.includes(ch as Delimiter))
			counts.set(ch, (counts.get(ch) ?? 0) + 1);
	}
	let best: Delimiter = ',';
	for (const d of DELIMITERS) if ((counts.get(d) ?? 0) > (counts.get(best) ?? 0)) best = d;
	return best;
}

/**
 * Read `text` into records. Records whose cells are all empty are skipped. Structural
 * problems (text after a closing quote, a quote inside an unquoted cell, an unclosed quote)
 * are reported with their line and cell; the rows read around them are still returned.
 */
export function parseCsv(
	text: string,
	delimiter: Delimiter = detectDelimiter(text)
): { delimiter: Delimiter; rows: CsvRow[]; problems: CsvProblem[] } {
	const src = text.replace(/^\uFEFF/, '');
	const rows: CsvRow[] = [];
	const problems: CsvProblem[] = [];
	let cells: string[] = [];
	let cell = '';
	let line = 1;
	let rowLine = 1;
	let i = 0;

	const endCell = () => {
		cells.push(cell);
		cell = '';
	};
	const endRow = () => {
		endCell();
		if (cells.some((c) => c !== '')) rows.push({ line: rowLine, cells });
		cells = [];
	};
	/** Consume a line break at `i` if there is one; true when consumed. */
	const lineBreak = () => {
		if (src[i] === '\r' && src[i + 1] === '\n') i += 2;
		else if (src[i] === '\n' || src[i] === '\r') i += 1;
		else return false;
		line++;
		return true;
	};

	while (i < src.length) {
		if (src[i] === '"' && cell === '') {
			// A quoted cell: runs to the next quote that is not doubled.
			const startLine = line;
			i++;
			let closed = false;
			while (i < src.length) {
				if (src[i] === '"') {
					if (src[i + 1] === '"') {
						cell += '"';
						i += 2;
						continue;
					}
					i++;
					closed = true;
					break;
				}
				if (src[i] === '\r' || src[i] === '\n') {
					const start = i;
					lineBreak();
					cell += src.slice(start, i);
					continue;
				}
				cell += src[i++];
			}
			if (!closed) {
				problems.push({ line: startLine, column: cells.length + 1, message: 'Unclosed quote' });
				break;
			}
			if (i < src.length && src[i] !== delimiter && src[i] !== '\r' && src[i] !== '\n') {
				problems.push({
					line,
					column: cells.length + 1,
					message: 'Text after a closing quote'
				});
				while (i < src.length && src[i] !== delimiter && src[i] !== '\r' && src[i] !== '\n') i++;
			}
			continue;
		}
		if (src[i] === delimiter) {
			endCell();
			i++;
			continue;
		}
		if (lineBreak()) {
			endRow();
			rowLine = line;
			continue;
		}
		if (src[i] === '"')
			problems.push({
				line,
				column: cells.length + 1,
				message: 'A quote inside a cell that does not start with one'
			});
		cell += src[i++];
	}
	if (cell !== '' || cells.length > 0) endRow();
	return { delimiter, rows, problems };
}

/**
 * Text a spreadsheet would run as a formula (starting with = + - @, a tab or a carriage
 * return) gets a leading `'` on the way out (OWASP, "CSV Injection"); `unguardFormula` undoes it.
 */
export const guardFormula = (s: string) => (/^'*[=+\-@\t\r]/.test(s) ? `'${s}` : s);
export const unguardFormula = (s: string) => (/^'+[=+\-@\t\r]/.test(s) ? s.slice(1) : s);

function quote(cell: string, delimiter: Delimiter): string {
	const needs = cell.includes(delimiter) || /["\r\n]/.test(cell) || cell !== cell.trim();
	return needs ? `"${cell.replaceAll('"', '""')}"` : cell;
}

/** Write records as CSV text, quoting only the cells that need it; lines end with CRLF. */
export function writeCsv(rows: readonly (readonly string[])[], delimiter: Delimiter = ','): string {
	return rows.map((r) => r.map((c) => quote(c, delimiter)).join(delimiter) + '\r\n').join('');
}
