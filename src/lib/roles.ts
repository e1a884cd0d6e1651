/**
 * The workshop's roles (DESIGN §6) and the one test of them that every layer shares.
 * Plain data, used by the server's rules and by the screens alike.
 */
export const ROLES = ['apprentice', 'technician', 'lead', 'owner'] as const;
export type Role = (typeof ROLES)[number];

/**
 * Leads and owners: they see the whole workshop (every job, the whole change feed), assign
 * jobs, approve sheets, sign off and settle clashes. Everyone else sees the jobs assigned
 * to them.
 */
export const isLead = (a: { role: Role | string }) => a.role === 'lead' || a.role === 'owner';
