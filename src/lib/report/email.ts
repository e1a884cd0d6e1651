/**
 * The e-mail that carries a report: its subject and plain-text body, in the report's own
 * words (the same `ReportDoc` as the page and the PDF). `link` is where the page opens.
 */
import type { ReportDoc } from './types';

export function emailSubject(r: ReportDoc): string {
	return `Your vehicle report: job ${r.jobNumber}, ${r.workshop.name}`;
}

export function emailText(r: ReportDoc, link: string, openUntil: string): string {
	const out = r.findings.filter((f) => f.outcome === 'out');
	const unclear = r.findings.filter((f) => f.outcome === 'unclear');
	const lines = [
		r.customerName ? `Dear ${r.customerName},` : 'Hello,',
		'',
		`Here is the report on your ${r.vehicle ? r.vehicle.heading : 'vehicle'} (job ${r.jobNumber}, ${r.dateText}).`,
		'',
		`What you told us: ${r.reported}`,
		'',
		r.summary,
		...(out.length ? ['', 'Out of spec:', ...out.map((f) => `- ${f.title}: ${f.sentence}`)] : []),
		...(unclear.length ? ['', 'Could not be told for sure:', ...unclear.map((f) => `- ${f.title}: ${f.sentence}`)] : []),
		...(r.workDone ? ['', `What we did: ${r.workDone}`] : []),
		...(r.recommendations.length
			? ['', 'What we recommend:', ...r.recommendations.map((x) => `- ${x.gradeText}: ${x.text}`)]
			: []),
		'',
		'The full report, with every figure we measured, is attached as a PDF. You can also read it online:',
		link,
		`(the link works until ${openUntil}).`,
		'',
		r.closing,
		'',
		`${r.technicians}`,
		r.workshop.name,
		...r.workshop.lines
	];
	return lines.join('\n') + '\n';
}
