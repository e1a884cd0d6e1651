/**
 * A band's temperatures in words ("below 50 °C", "50–100 °C"), with no other imports, so the
 * schemas and the labels can both use it.
 */
export function temperatureRangeText(b: { fromC: number | null; toC: number | null }): string {
	if (b.fromC === null && b.toC === null) return 'any temperature';
	if (b.fromC === null) return `below ${b.toC} °C`;
	if (b.toC === null) return `${b.fromC} °C and above`;
	return `${b.fromC}–${b.toC} °C`;
}
