/** A clash as the inbox shows it (built on the server by `server/sync/clash-inbox.ts`). */
import type { FieldKind } from './words';

/** Someone's edit: who, on which screen, when (the phone's clock, or the server's). */
export type Edit = { who: string; screen: string; at: string | null };
export type ClashView = {
	id: string;
	record: string;
	href: string | null;
	field: string;
	fieldLabel: string;
	kind: FieldKind;
	openedAt: string;
	stored: { text: string; by: Edit[] };
	candidates: (Edit & { deviceId: string; text: string })[];
	/** Values the lead may choose instead (choice fields), or null. */
	choices: { value: string; label: string }[] | null;
	/** Whether the lead may type or choose a value of their own. */
	ownValue: boolean;
};
