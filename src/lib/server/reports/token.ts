/**
 * Report links: a random token of 256 bits (base64url, 43 characters) in the address; only
 * its SHA-256 is stored, so the database alone cannot open a report.
 */
import { createHash, randomBytes } from 'node:crypto';

export const newReportToken = () => randomBytes(32).toString('base64url');

export const hashReportToken = (token: string) => createHash('sha256').update(token).digest('hex');

/** Whether text has the shape of a token (checked before any lookup). */
export const looksLikeToken = (s: string) => /^[A-Za-z0-9_-]{43}$/.test(s);
