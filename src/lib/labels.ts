/** The product's words for roles and statuses (DESIGN §7). */
export const ROLE_LABELS = {
	apprentice: 'Apprentice',
	technician: 'Technician',
	lead: 'Workshop lead',
	owner: 'Owner'
} as const;
export { STATUS_LABELS } from './schemas/job';
