/** What a customer reads when a report link no longer opens (410) or never existed (404). */
export function goneMessage(state: 'expired' | 'withdrawn' | 'unknown', workshop = 'the workshop'): string {
	if (state === 'withdrawn')
		return `This report is no longer shared here: ${workshop} has withdrawn this link. If you still need it, please ask them for a new one; they will be glad to help.`;
	if (state === 'expired')
		return `This link has expired: report links stay open for a limited time to keep your details private. Please ask ${workshop} for a new link if you need the report again.`;
	return 'We could not find a report at this address. Please check the link, or ask the workshop for a new one.';
}
