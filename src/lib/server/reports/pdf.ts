/**
 * The customer's report as a PDF (pdfkit), drawn from the same `ReportDoc` as the report
 * page, in the shipped Roboto Condensed (fonts.ts), on A4 or US Letter. Each finding shows
 * its outcome as a word and a shape (circle OK, triangle out of spec, diamond can't tell)
 * as well as a colour. Photos marked for the customer are drawn at most 80 mm wide, two to
 * a row, with their captions; the bytes come from `loadPhoto` (the server passes
 * `printPhotoLoader`: a print-size picture made from the original, the report's thumbnail
 * when the original is gone).
 */
import PDFDocument from 'pdfkit';
import type { Outcome, Paper, ReportDoc, ReportPhoto } from '../../report/types';
import { fontRuns, registerFonts, type Weight } from './fonts';

const INK = '#0b1f2a';
const MUTED = '#33434d';
const LINE = '#51606a';
const COLOUR: Record<Outcome, string> = { ok: '#0f5b2e', out: '#8f1d14', unclear: '#6b4a00' };
const MM = 72 / 25.4;
const SIZE: Record<Paper, 'A4' | 'LETTER'> = { a4: 'A4', letter: 'LETTER' };

type Doc = InstanceType<typeof PDFDocument>;
type TextOpts = { size?: number; weight?: Weight; color?: string; x?: number; width?: number; gap?: number };

/**
 * Photos at print size for the PDF of a report of `workshopId` (`printPhoto`), the thumbnail
 * inside the report when the original is gone.
 */
export function printPhotoLoader(
	workshopId: string,
	print: (workshopId: string, photoId: string) => Promise<Buffer | null>
): NonNullable<PdfOptions['loadPhoto']> {
	return async (p) => (await print(workshopId, p.id)) ?? inlineBytes(p);
}

export type PdfOptions = {
	paper: Paper;
	/** The bytes (JPEG or PNG) of a photo marked for the customer; null when it is gone. */
	loadPhoto?: (photo: ReportPhoto) => Promise<Buffer | null>;
};

/** Write text in runs of the right font subset; `x`/`width` default to the margins. */
function write(doc: Doc, text: string, o: TextOpts = {}) {
	const x = o.x ?? doc.page.margins.left;
	const width = o.width ?? doc.page.width - doc.page.margins.right - x;
	doc.fontSize(o.size ?? 11).fillColor(o.color ?? INK);
	const runs = fontRuns(text || ' ', o.weight ?? 400);
	runs.forEach((r, i) => {
		doc.font(r.font);
		const opts = { width, lineGap: 1.5, continued: i < runs.length - 1 };
		if (i === 0) doc.text(r.text, x, doc.y, opts);
		else doc.text(r.text, opts);
	});
	doc.x = doc.page.margins.left;
	if (o.gap) doc.y += o.gap;
}

function bottom(doc: Doc) {
	return doc.page.height - doc.page.margins.bottom;
}

/** Start a new page when less than `h` points are left. */
function room(doc: Doc, h: number) {
	if (doc.y + h > bottom(doc)) doc.addPage();
}

function heading(doc: Doc, text: string) {
	room(doc, 60);
	doc.y += 8;
	write(doc, text, { size: 15, weight: 700, gap: 3 });
	const y = doc.y;
	doc.moveTo(doc.page.margins.left, y).lineTo(doc.page.width - doc.page.margins.right, y).lineWidth(1).strokeColor(LINE).stroke();
	doc.y = y + 6;
}

/** The outcome's shape, 10 pt, at (x, y). */
function shape(doc: Doc, outcome: Outcome, x: number, y: number) {
	doc.save().fillColor(COLOUR[outcome]);
	if (outcome === 'ok') doc.circle(x + 5, y + 5, 5).fill();
	else if (outcome === 'out') doc.polygon([x, y + 10], [x + 10, y + 10], [x + 5, y]).fill();
	else doc.polygon([x + 5, y], [x + 10, y + 5], [x + 5, y + 10], [x, y + 5]).fill();
	doc.restore();
}

function lines(doc: Doc, head: string, rows: string[]) {
	room(doc, 30);
	write(doc, head, { size: 12, weight: 700, gap: 1 });
	for (const r of rows) write(doc, r, { color: MUTED });
	doc.y += 6;
}

/** The bytes of a photo whose `src` is a data address (as `customerPhotos` gives them). */
export const inlineBytes = async (p: ReportPhoto) => {
	const m = /^data:image\/(?:jpeg|png);base64,(.+)$/.exec(p.src);
	return m ? Buffer.from(m[1], 'base64') : null;
};

async function photos(doc: Doc, list: ReportPhoto[], load: PdfOptions['loadPhoto'] = inlineBytes) {
	if (!list.length) return;
	heading(doc, 'Photos');
	const w = Math.min(80 * MM, (doc.page.width - doc.page.margins.left - doc.page.margins.right - 12) / 2);
	const h = w * 0.75;
	let col = 0;
	let top = doc.y;
	for (const p of list) {
		const bytes = await load(p);
		if (!bytes) continue;
		if (col === 0) {
			room(doc, h + 40);
			top = doc.y;
		}
		const x = doc.page.margins.left + col * (w + 12);
		doc.image(bytes, x, top, { fit: [w, h], align: 'center', valign: 'center' });
		doc.y = top + h + 3;
		write(doc, p.caption, { x, width: w, size: 10, color: MUTED });
		col = (col + 1) % 2;
		doc.y = col === 0 ? doc.y + 8 : top;
	}
	if (col === 1) doc.y = top + h + 30;
}

function footer(doc: Doc, r: ReportDoc) {
	const range = doc.bufferedPageRange();
	for (let i = range.start; i < range.start + range.count; i++) {
		doc.switchToPage(i);
		const keep = doc.page.margins.bottom;
		doc.page.margins.bottom = 0; // writing below the margin must not start a page
		doc.y = doc.page.height - 36;
		write(doc, `${r.workshop.name} · Job ${r.jobNumber} · ${r.dateText} · Page ${i + 1} of ${range.count}`, {
			size: 9,
			color: MUTED
		});
		doc.page.margins.bottom = keep;
	}
}

/** The PDF of a report. */
export async function renderReportPdf(r: ReportDoc, o: PdfOptions): Promise<Buffer> {
	const doc = new PDFDocument({
		size: SIZE[o.paper],
		margins: { top: 48, bottom: 56, left: 52, right: 52 },
		bufferPages: true,
		lang: 'en-GB',
		info: { Title: r.title, Author: r.workshop.name, Subject: `Job ${r.jobNumber}`, Creator: 'Fieldbench' }
	});
	registerFonts(doc);
	const chunks: Buffer[] = [];
	doc.on('data', (c: Buffer) => chunks.push(c));
	const done = new Promise<Buffer>((resolve, reject) => {
		doc.on('end', () => resolve(Buffer.concat(chunks)));
		doc.on('error', reject);
	});

	write(doc, r.workshop.name, { size: 13, weight: 700 });
	for (const l of r.workshop.lines) write(doc, l, { size: 10, color: MUTED });
	doc.y += 10;
	write(doc, r.title, { size: 22, weight: 700, gap: 2 });
	write(doc, [r.dateText, r.customerName ? `For ${r.customerName}` : null].filter(Boolean).join(' · '), {
		size: 12,
		color: MUTED,
		gap: 4
	});

	heading(doc, 'Your vehicle');
	if (r.vehicle) lines(doc, r.vehicle.heading, r.vehicle.lines);
	else write(doc, 'No vehicle recorded on this job.', { gap: 4 });

	heading(doc, 'What you told us');
	write(doc, r.reported, { gap: 4 });

	heading(doc, 'Summary');
	write(doc, r.summary, { size: 12, gap: 4 });

	heading(doc, 'What we tested');
	if (!r.tested.length) write(doc, 'Nothing has been tested on this job yet.', { gap: 4 });
	for (const t of r.tested) lines(doc, t.heading, t.lines);

	heading(doc, 'What we found');
	if (!r.findings.length) write(doc, 'No findings yet.', { gap: 4 });
	for (const f of r.findings) {
		room(doc, 70);
		const y = doc.y;
		shape(doc, f.outcome, doc.page.margins.left, y + 3);
		write(doc, `${f.outcomeText} · ${f.title}`, { x: doc.page.margins.left + 16, size: 12, weight: 700, color: COLOUR[f.outcome] });
		write(doc, f.sentence, { x: doc.page.margins.left + 16, gap: 2 });
		for (const g of f.figures)
			write(doc, `${g.label}: ${g.value}.${g.spec ? ` ${g.specLabel ?? 'Maker’s figure'}: ${g.spec}.` : ''} Result: ${g.result}.`, {
				x: doc.page.margins.left + 16,
				size: 10,
				color: MUTED
			});
		doc.y += 8;
	}

	for (const c of r.codes) {
		heading(doc, c.heading);
		for (const l of c.lines) write(doc, l);
	}

	await photos(doc, r.photos, o.loadPhoto);

	heading(doc, 'What we did');
	write(doc, r.workDone ?? 'Testing only, so far.', { gap: 4 });

	if (r.recommendations.length) {
		heading(doc, 'What we recommend');
		for (const rec of r.recommendations) {
			room(doc, 30);
			write(doc, rec.gradeText, { size: 11, weight: 700 });
			write(doc, rec.text, { gap: 4 });
		}
	}

	heading(doc, 'Tested by');
	write(doc, `${r.technicians}, ${r.workshop.name}, ${r.dateText}.`, { gap: r.timeNote ? 2 : 8 });
	if (r.timeNote) write(doc, r.timeNote, { size: 9, gap: 8 });

	room(doc, 70);
	const top = doc.y;
	write(doc, r.closing, { x: doc.page.margins.left + 10, width: doc.page.width - doc.page.margins.left - doc.page.margins.right - 20, size: 11 });
	doc.rect(doc.page.margins.left, top - 6, doc.page.width - doc.page.margins.left - doc.page.margins.right, doc.y - top + 10).lineWidth(1).strokeColor(LINE).stroke();

	footer(doc, r);
	doc.end();
	return done;
}
